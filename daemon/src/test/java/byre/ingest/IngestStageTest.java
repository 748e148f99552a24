package byre.ingest;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;

import byre.config.PayloadFormat;
import byre.config.SensorConfig;
import byre.testing.ManualTicker;
import byre.units.Quantity;
import byre.units.Unit;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.nio.charset.StandardCharsets;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneOffset;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/** Bad input table: each malformed payload and the exact reason and detail it gets. */
class IngestStageTest {
    static final Instant NOW = Instant.parse("2026-07-14T13:05:00Z");
    final SimpleMeterRegistry registry = new SimpleMeterRegistry();
    final List<Reading> accepted = new ArrayList<>();
    final IngestStage stage = new IngestStage(List.of(
            new SensorConfig("pen1-dry", "barn/pen1/dry", Quantity.DRY_BULB, Unit.F, PayloadFormat.NUMBER, null, 0, 1),
            new SensorConfig("pen1-air", "barn/pen1/air", Quantity.AIR_SPEED, Unit.FT_PER_MIN,
                    new PayloadFormat(PayloadFormat.Kind.JSON, "speed"), "ts", 0, 2),
            new SensorConfig("shed-rh", "barn/shed/senml", Quantity.RH, Unit.PERCENT,
                    new PayloadFormat(PayloadFormat.Kind.SENML, "shed/rh"), null, 0, 3),
            new SensorConfig("pens-wet", "barn/+/wet", Quantity.WET_BULB, Unit.C, PayloadFormat.NUMBER, null, 2, 4)),
            Clock.fixed(NOW, ZoneOffset.UTC), registry, accepted::add, 50);

    double rejected(String reason) {
        return registry.counter("byre.readings.rejected", "reason", reason).count();
    }

    Reading send(String topic, String payload) {
        return stage.accept(topic, payload.getBytes(StandardCharsets.UTF_8));
    }

    @ParameterizedTest(name = "{0} {1} -> {2}")
    @CsvSource(delimiter = '|', quoteCharacter = '`', textBlock = """
            barn/pen1/dry | abc                          | unparseable
            barn/pen1/dry | ``                           | unparseable
            barn/pen1/dry | 12,5                         | unparseable
            barn/pen1/dry | NaN                          | not-finite
            barn/pen1/dry | -Infinity                    | not-finite
            barn/pen1/dry | 1e400                        | not-finite
            barn/pen1/dry | 400                          | out-of-range
            barn/pen1/dry | -90                          | out-of-range
            barn/pen1/air | {"speed": 120                | unparseable
            barn/pen1/air | {"velocity": 120}            | missing-field
            barn/pen1/air | {"speed": true}              | unparseable
            barn/pen1/air | {"speed": -5}                | out-of-range
            barn/pen1/air | {"speed": 1, "ts": "noon"}   | unparseable
            barn/shed/senml | {"n":"rh","v":50}          | unparseable
            barn/shed/senml | [{"n":"shed/rh","v":"x"}]  | unparseable
            barn/shed/senml | [{"n":"other","v":50}]     | missing-field
            barn/shed/senml | [{"n":"shed/rh","u":"Cel","v":50}] | bad-unit
            barn/shed/senml | [{"n":"shed/rh","v":140}]  | out-of-range
            """)
    void rejectsMalformedPayloadsByReason(String topic, String payload, String reason) {
        assertNull(send(topic, payload));
        assertEquals(1.0, rejected(reason));
        assertEquals(0, accepted.size());
    }

    @Test
    void refusesPayloadsOver4KiB() {
        byte[] big = new byte[4097];
        java.util.Arrays.fill(big, (byte) '1');
        assertNull(stage.accept("barn/pen1/dry", big));
        assertEquals(1.0, rejected("too-large"));
        assertNull(stage.accept("barn/pen1/dry", new byte[] {(byte) 0xff, (byte) 0xfe}));
        assertEquals(1.0, rejected("unparseable"), "not UTF-8");
    }

    @Test
    void convertsToCanonicalUnits() {
        // 0 C = 32 F, 20 C = 68 F (common practice); 1 ft/min = 0.00508 m/s exactly (definition of the foot).
        assertEquals(20.0, send("barn/pen1/dry", "68").value(), 1e-9);
        assertEquals(0.508, send("barn/pen1/air", "{\"speed\": 100}").value(), 1e-9);
        Reading rh = send("barn/shed/senml", "[{\"bn\":\"shed/\",\"n\":\"rh\",\"u\":\"%RH\",\"v\":71.2}]");
        assertEquals(71.2, rh.value(), 1e-9);
        Reading wet = send("barn/pen7/wet", "12.5");
        assertEquals("pens-wet/pen7", wet.sensorId());
        assertEquals(4, accepted.size());
    }

    @Test
    void takesBelievableTimesFromThePayloadAndReplacesOthers() {
        Instant tenSecondsAgo = NOW.minusSeconds(10);
        assertEquals(tenSecondsAgo, send("barn/pen1/air", "{\"speed\":1,\"ts\":" + tenSecondsAgo.getEpochSecond() + "}").at());
        assertEquals(tenSecondsAgo, send("barn/pen1/air", "{\"speed\":1,\"ts\":\"" + tenSecondsAgo + "\"}").at());
        // A Pi without a real-time clock boots in 1970: use the arrival time and count it.
        assertEquals(NOW, send("barn/pen1/air", "{\"speed\":1,\"ts\":86400}").at());
        // (The second arrival-stamped reading of the same sensor in the same millisecond is one millisecond later.)
        assertEquals(NOW.plusMillis(1), send("barn/pen1/air", "{\"speed\":1,\"ts\":" + NOW.plusSeconds(600).toEpochMilli() + "}").at());
        assertEquals(1.0, registry.counter("byre.readings.time.replaced", "reason", "before-2020").count());
        assertEquals(1.0, registry.counter("byre.readings.time.replaced", "reason", "ahead").count());
        // SenML: base time plus time (RFC 8428 section 4.5.3).
        Reading s = send("barn/shed/senml", "[{\"bn\":\"shed/\",\"bt\":" + (NOW.getEpochSecond() - 60) + ",\"n\":\"rh\",\"v\":50,\"t\":30}]");
        assertEquals(NOW.minusSeconds(30), s.at());
    }

    @Test
    void countsUnroutedTopics() {
        assertNull(send("barn/elsewhere", "1"));
        assertEquals(1.0, registry.counter("byre.readings.unrouted").count());
    }

    /** The flood gate on a hand-moved ticker: exact counts, no timing. */
    @Test
    void throttlesAFloodToItsBurstThenItsRate() {
        ManualTicker ticker = new ManualTicker();
        IngestStage timed = timedStage(ticker);
        ticker.advance(IngestStage.BACKLOG_GRACE.plusSeconds(1)); // the grace after start is over
        assertEquals(IngestStage.FLOOD_BURST, admitted(timed, 3000), "a burst of 1000 passes (a session backlog)");
        assertEquals(3000 - IngestStage.FLOOD_BURST, (int) rejected("flood"));
        assertEquals(0, admitted(timed, 10), "the bucket is empty while no time passes");
        ticker.advance(Duration.ofSeconds(1));
        assertEquals(50, admitted(timed, 100), "then 50 per second");
        ticker.advance(Duration.ofMillis(100));
        assertEquals(5, admitted(timed, 100));
    }

    /** After a (re)connection the broker delivers the session's backlog at once: no flood limit for 30 s. */
    @Test
    void aConnectionOpensAGracePeriodForTheBacklog() {
        ManualTicker ticker = new ManualTicker();
        IngestStage timed = timedStage(ticker);
        ticker.advance(Duration.ofMinutes(5));
        timed.connected();
        assertEquals(5000, admitted(timed, 5000));
        ticker.advance(IngestStage.BACKLOG_GRACE);
        assertEquals(3000, admitted(timed, 3000), "still within the grace at exactly 30 s");
        ticker.advance(Duration.ofNanos(1));
        assertEquals(IngestStage.FLOOD_BURST, admitted(timed, 3000), "after it, the gate's burst and no more");
    }

    private IngestStage timedStage(ManualTicker ticker) {
        return new IngestStage(List.of(new SensorConfig("pen1-dry", "barn/pen1/dry", Quantity.DRY_BULB, Unit.F, PayloadFormat.NUMBER, null, 0, 1)),
                Clock.fixed(NOW, ZoneOffset.UTC), ticker, registry, accepted::add, 50);
    }

    private static int admitted(IngestStage s, int n) {
        int ok = 0;
        for (int i = 0; i < n; i++) {
            if (s.accept("barn/pen1/dry", "68".getBytes(StandardCharsets.UTF_8)) != null) ok++;
        }
        return ok;
    }

    /**
     * A message delivered with the retain flag is the sensor's last value from before byre subscribed, delivered
     * again on every (re)connection. With its own time it is a reading of that time; without one its age is unknown,
     * and taking it at the arrival time made a dead sensor look alive after every reconnect.
     */
    @Test
    void aRetainedValueIsTakenAtItsOwnTimeOrNotAtAll() {
        int[] acks = {0};
        Instant twoDaysAgo = NOW.minus(Duration.ofDays(2));
        Reading timed = stage.accept("barn/pen1/air", ("{\"speed\":100,\"ts\":\"" + twoDaysAgo + "\"}").getBytes(StandardCharsets.UTF_8),
                true, () -> acks[0]++);
        assertEquals(twoDaysAgo, timed.at());
        assertEquals(1, accepted.size());

        assertNull(stage.accept("barn/pen1/dry", "68".getBytes(StandardCharsets.UTF_8), true, () -> acks[0]++));
        assertNull(stage.accept("barn/pen1/air", "{\"speed\":100,\"ts\":86400}".getBytes(StandardCharsets.UTF_8), true, () -> acks[0]++),
                "a time from an unset clock is no time");
        assertEquals(1, accepted.size(), "untimed retained values are not readings");
        assertEquals(2, acks[0], "and are acknowledged, so the broker does not send them again on this session");
        assertEquals(2.0, registry.counter("byre.readings.retained.untimed").count());
        // The same message without the flag is an ordinary new reading at its arrival time.
        assertEquals(NOW, stage.accept("barn/pen1/dry", "68".getBytes(StandardCharsets.UTF_8), false, null).at());
    }

    @Test
    void readingsArrivingInTheSameMillisecondKeepDistinctTimes() {
        // The clock stands still (as it can between two messages): each reading still gets its own row time.
        Reading a = send("barn/pen1/dry", "68");
        Reading b = send("barn/pen1/dry", "69");
        Reading c = send("barn/pen1/dry", "70");
        assertEquals(NOW, a.at());
        assertEquals(NOW.plusMillis(1), b.at());
        assertEquals(NOW.plusMillis(2), c.at());
        // Another sensor has its own sequence.
        assertEquals(NOW, send("barn/pen7/wet", "12.5").at());
    }
}
