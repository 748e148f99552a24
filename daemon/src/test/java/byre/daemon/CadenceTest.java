package byre.daemon;

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
}
