package byre.zones;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
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

/** Combining a zone's sensors: freshness, derivation pacing, the wet-above-dry flag. */
class ZoneStageTest {
    static final Instant T0 = Instant.parse("2026-01-12T20:00:00Z");
    final List<String> flags = new ArrayList<>();
    final List<String> skipped = new ArrayList<>();
    final ZoneStage stage = new ZoneStage(List.of(new ZoneConfig("calf-pen-1", List.of("calves"),
            List.of("pen1-dry", "pen1-wet", "pen1-air"), Double.NaN, ZoneConfig.Psychrometer.ASPIRATED, Duration.ofMinutes(5),
            "nrc-1971", 1)), new ClimateDeriver(), new ZoneStage.Observer() {
                @Override
                public void wetBulbAboveDryBulb(String zone, double excessC) {
                    flags.add(zone);
                }

                @Override
                public void derivationSkipped(String zone, String why) {
                    skipped.add(zone + ": " + why);
                }

                @Override
                public void derived(String zone) {}
            });

    List<ZoneReading> feed(Reading r) {
        List<ZoneReading> out = new ArrayList<>();
        stage.accept(r, out::add);
        return out;
    }

    static boolean has(List<ZoneReading> rows, Quantity q) {
        return rows.stream().anyMatch(z -> z.quantity() == q);
    }

    @Test
    void derivesAsSoonAsTheInputsAreThereAndAtMostOnceASecond() {
        assertTrue(has(feed(new Reading("pen1-dry", Quantity.DRY_BULB, 5.0, T0)), Quantity.DRY_BULB));
        // Wet bulb 200 ms later: within the pacing interval, so the derivation waits for the next tick.
        List<ZoneReading> second = feed(new Reading("pen1-wet", Quantity.WET_BULB, 4.0, T0.plusMillis(200)));
        assertEquals(List.of(Quantity.WET_BULB), second.stream().map(ZoneReading::quantity).toList());
        List<ZoneReading> pending = new ArrayList<>();
        stage.derivePending(T0.plusMillis(500), pending::add);
        assertEquals(List.of(), pending, "not due yet");
        stage.derivePending(T0.plusMillis(1000), pending::add);
        assertTrue(has(pending, Quantity.RH) && has(pending, Quantity.THI), pending.toString());
        assertEquals(T0.plusMillis(200), pending.get(0).at(), "derived values carry the time of the newest input");
        // A reading more than a second after the last derivation derives at once.
        assertTrue(has(feed(new Reading("pen1-air", Quantity.AIR_SPEED, 3.0, T0.plusSeconds(2))), Quantity.WIND_CHILL));
    }

    @Test
    void staleInputsAreNotCombined() {
        feed(new Reading("pen1-wet", Quantity.WET_BULB, 4.0, T0));
        // Dry bulb six minutes later: the wet bulb is older than max-age (5m), so no humidity is derived.
        assertFalse(has(feed(new Reading("pen1-dry", Quantity.DRY_BULB, 5.0, T0.plusSeconds(360))), Quantity.RH));
    }

    @Test
    void flagsAWetBulbAboveTheDryBulbOnceAndLeavesItOut() {
        feed(new Reading("pen1-dry", Quantity.DRY_BULB, 5.0, T0));
        List<ZoneReading> out = feed(new Reading("pen1-wet", Quantity.WET_BULB, 6.0, T0.plusSeconds(2)));
        assertEquals(List.of("calf-pen-1"), flags);
        assertEquals(List.of(), skipped, "one fault, one report");
        assertFalse(has(out, Quantity.RH), "no humidity from a wet bulb that cannot be right");
    }

    List<ZoneReading> feedLive(Reading r, Instant now) {
        List<ZoneReading> out = new ArrayList<>();
        stage.accept(r, now, out::add);
        return out;
    }

    /**
     * Readings that are not news are kept out of live evaluation: a repeat or an older reading of a stream, and one
     * older than the zone's max-age before now (a sensor's buffer flushed after an outage, a retained last value).
     * Fed on, they counted at the present time: a value of two days ago raised an alert "since now". Before the
     * change an older reading was still passed on.
     */
    @Test
    void readingsThatAreNotNewsDoNotReachTheWatches() {
        Instant now = T0.plus(Duration.ofDays(2));
        assertEquals(List.of(), feedLive(new Reading("pen1-dry", Quantity.DRY_BULB, 35.0, T0), now), "two days old");
        assertEquals(List.of(), feedLive(new Reading("pen1-dry", Quantity.DRY_BULB, 35.0, now.minus(Duration.ofHours(3))), now),
                "a buffer of three hours ago");
        assertTrue(Double.isNaN(stage.latest("calf-pen-1", Quantity.DRY_BULB)), "nor do they become the zone's input");

        // Exactly max-age old is still fresh (a sensor reporting every max-age must count).
        assertTrue(has(feedLive(new Reading("pen1-dry", Quantity.DRY_BULB, 5.0, now.minus(Duration.ofMinutes(5))), now), Quantity.DRY_BULB));
        assertTrue(has(feedLive(new Reading("pen1-dry", Quantity.DRY_BULB, 5.5, now), now), Quantity.DRY_BULB));
        assertEquals(List.of(), feedLive(new Reading("pen1-dry", Quantity.DRY_BULB, 5.5, now), now), "a repeat (a redelivery)");
        assertEquals(List.of(), feedLive(new Reading("pen1-dry", Quantity.DRY_BULB, 9.0, now.minusSeconds(30)), now), "older than the current input");
        assertEquals(5.5, stage.latest("calf-pen-1", Quantity.DRY_BULB));
        // Another stream of the zone a little behind the dry bulb is news for its own stream.
        assertTrue(has(feedLive(new Reading("pen1-wet", Quantity.WET_BULB, 4.0, now.minusSeconds(2)), now), Quantity.WET_BULB));
    }

    /** Replay has no clock: readings in time order all count, however old. */
    @Test
    void replayTakesOldReadingsInOrder() {
        assertTrue(has(feed(new Reading("pen1-dry", Quantity.DRY_BULB, 5.0, T0)), Quantity.DRY_BULB));
        assertTrue(has(feed(new Reading("pen1-dry", Quantity.DRY_BULB, 5.1, T0.plusSeconds(60))), Quantity.DRY_BULB));
        assertEquals(List.of(), feed(new Reading("pen1-dry", Quantity.DRY_BULB, 5.1, T0.plusSeconds(60))), "a duplicate row counts once");
    }

    /** A derivation put off live says when it is due, so that the pipeline need not look for it four times a second. */
    @Test
    void aPutOffDerivationSaysWhenItIsDue() {
        Instant now = T0.plusMillis(300);
        assertEquals(null, stage.nextPending(), "nothing put off");
        feedLive(new Reading("pen1-dry", Quantity.DRY_BULB, 5.0, T0), now);
        assertEquals(null, stage.nextPending(), "the first reading derives at once");
        feedLive(new Reading("pen1-wet", Quantity.WET_BULB, 4.0, T0.plusMillis(200)), now);
        assertEquals(T0.plusMillis(1000), stage.nextPending(), "a second after the last derivation");
        List<ZoneReading> pending = new ArrayList<>();
        stage.derivePending(T0.plusMillis(999), pending::add);
        assertEquals(List.of(), pending, "not before");
        assertEquals(T0.plusMillis(1000), stage.nextPending(), "still due then");
        stage.derivePending(T0.plusMillis(1000), pending::add);
        assertTrue(has(pending, Quantity.RH), "due at that very time: " + pending);
        assertEquals(null, stage.nextPending(), "nothing left");

        // A clock behind the last derivation's reading time (the sensors' clocks run ahead): due at once, as
        // derivePending takes it.
        feedLive(new Reading("pen1-wet", Quantity.WET_BULB, 4.1, T0.plusMillis(1100)), T0.plusMillis(100));
        assertEquals(T0.plusMillis(100), stage.nextPending());
    }
}
