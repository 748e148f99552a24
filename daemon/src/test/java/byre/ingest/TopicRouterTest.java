package byre.ingest;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;

import byre.config.PayloadFormat;
import byre.config.SensorConfig;
import byre.units.Quantity;
import byre.units.Unit;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.nio.charset.StandardCharsets;
import java.time.Clock;
import java.time.Instant;
import java.time.ZoneOffset;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;

/**
 * Sensor families whose topic starts with a wildcard take no topic beginning with {@code $}: those are the broker's
 * own ({@code $SYS/...}), not a sensor's (MQTT 3.1.1 section 4.7.2).
 */
class TopicRouterTest {
    final List<SensorConfig> sensors = List.of(
            new SensorConfig("any-dry", "+/dry", Quantity.DRY_BULB, Unit.C, PayloadFormat.NUMBER, null, 1, 1),
            new SensorConfig("all-rh", "#", Quantity.RH, Unit.PERCENT, PayloadFormat.NUMBER, null, 2, 2));

    @Test
    void aFamilyStartingWithAWildcardTakesNoBrokerTopic() {
        TopicRouter router = new TopicRouter(sensors);
        assertEquals("any-dry/pen1", router.route("pen1/dry").sensorId());
        assertEquals("all-rh/pen1", router.route("larkmoor/pen1/rh").sensorId());
        assertNull(router.route("$SYS/dry"));
        assertNull(router.route("$SYS/broker/load/messages"));
        assertEquals(1, router.familySize("any-dry"), "no id taken in for a $ topic");
        assertEquals(1, router.familySize("all-rh"), "no id taken in for a $ topic");
    }

    @Test
    void aBrokerTopicReachingTheStageIsCountedAsUnroutedAndNotStored() {
        SimpleMeterRegistry registry = new SimpleMeterRegistry();
        List<Reading> accepted = new ArrayList<>();
        IngestStage stage = new IngestStage(sensors, Clock.fixed(Instant.parse("2026-07-14T13:05:00Z"), ZoneOffset.UTC),
                registry, accepted::add, 0);
        List<Boolean> acked = new ArrayList<>();
        assertNull(stage.accept("$SYS/dry", "21.5".getBytes(StandardCharsets.UTF_8), () -> acked.add(true)));
        assertEquals(List.of(), accepted);
        assertEquals(1.0, registry.counter("byre.readings.unrouted").count());
        assertEquals(List.of(true), acked, "acknowledged at once: nothing to store");
    }
}
