package byre.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.time.Duration;
import java.time.Instant;
import org.junit.jupiter.api.Test;

class CadenceTest {
    static final Instant T0 = Instant.parse("2026-01-12T20:00:00Z");

    @Test
    void onceAnIntervalAndAtOnceAfterTheClockSteppedBackFar() {
        Cadence c = new Cadence(Duration.ofSeconds(5), Duration.ofSeconds(60));
        assertTrue(c.due(T0), "the first tick is a turn");
        assertFalse(c.due(T0.plusMillis(250)));
        assertFalse(c.due(T0.plusMillis(4999)));
        assertTrue(c.due(T0.plusSeconds(5)));
        assertFalse(c.due(T0.minusSeconds(50)), "a small step back waits for the schedule");
        assertTrue(c.due(T0.minusSeconds(60)), "a step back beyond the tolerance is a turn at once");
        c.restart(T0.plusSeconds(100));
        assertFalse(c.due(T0.plusSeconds(104)));
        assertTrue(c.due(T0.plusSeconds(105)));
    }

    @Test
    void nextAtNamesTheTimeDueSaysYesAndNowWhenItWouldAlready() {
        Cadence c = new Cadence(Duration.ofSeconds(5), Duration.ofSeconds(60));
        assertEquals(T0, c.nextAt(T0), "before the first turn: at once");
        c.due(T0);
        assertEquals(T0.plusSeconds(5), c.nextAt(T0));
        assertEquals(T0.plusSeconds(5), c.nextAt(T0.plusMillis(4999)));
        assertFalse(c.due(T0.plusMillis(4999)), "nextAt does not move the schedule");
        assertEquals(T0.plusSeconds(6), c.nextAt(T0.plusSeconds(6)), "overdue: now");
        assertEquals(T0.plusSeconds(5), c.nextAt(T0.minusSeconds(50)), "a small step back waits for the schedule");
        assertEquals(T0.minusSeconds(56), c.nextAt(T0.minusSeconds(56)), "a step back beyond the tolerance: now");
        assertTrue(c.due(T0.minusSeconds(56)), "as due says");
    }

    @Test
    void withSlackAnyTurnInTheSpanServesAndNextAtNamesItsEnd() {
        Cadence c = new Cadence(Duration.ofMillis(1500), Duration.ofMillis(500), Duration.ofSeconds(10));
        c.due(T0);
        assertEquals(T0.plusSeconds(2), c.nextAt(T0), "at the latest 2 s on");
        assertFalse(c.due(T0.plusMillis(1499)));
        assertTrue(c.due(T0.plusMillis(1600)), "a turn of the readings after 1.5 s serves");
        assertEquals(T0.plusMillis(3600), c.nextAt(T0.plusMillis(1600)));
        assertEquals(T0.plusSeconds(4), c.nextAt(T0.plusSeconds(4)), "overdue: now");
    }
}
