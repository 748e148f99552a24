package byre.zones;

import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.config.ZoneConfig;
import byre.ingest.Reading;
import byre.rules.ZoneReading;
import byre.units.Quantity;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;

/**
 * A zone that has never been derived derives on its inputs at once, and later on the next tick: the "never derived"
 * mark must not be taken for a derivation less than a second ago (regression: zones never derived at all).
 */
class ZoneStageFirstDerivationTest {
    static final Instant T = Instant.parse("2026-07-14T13:05:00Z");

    final List<ZoneReading> out = new ArrayList<>();
    final ZoneStage stage = new ZoneStage(List.of(new ZoneConfig("calf-pen", List.of(), List.of("dry", "rh"), 0,
            ZoneConfig.Psychrometer.ASPIRATED, Duration.ofMinutes(5), "nrc-1971", 1)), new ClimateDeriver(), ZoneStage.Observer.NONE);

    boolean hasThi() {
        return out.stream().anyMatch(r -> r.quantity() == Quantity.THI);
    }

    @Test
    void derivesOnTheFirstCompleteInputs() {
        stage.accept(new Reading("rh", Quantity.RH, 60, T), out::add);
        stage.accept(new Reading("dry", Quantity.DRY_BULB, 25, T.plusSeconds(2)), out::add);
        assertTrue(hasThi(), () -> "no THI from dry bulb and RH 2 s apart: " + out);
    }

    @Test
    void aDerivationPutOffWithinTheSecondIsDoneOnTheNextTick() {
        stage.accept(new Reading("dry", Quantity.DRY_BULB, 25, T), out::add);
        stage.accept(new Reading("rh", Quantity.RH, 60, T.plusMillis(300)), out::add);
        stage.derivePending(T.plusMillis(1300), out::add);
        assertTrue(hasThi(), () -> "no THI after the tick: " + out);
    }
}
