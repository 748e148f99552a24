package byre.ingest;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.config.PayloadFormat;
import byre.config.SensorConfig;
import byre.units.Quantity;
import byre.units.Unit;
import ch.qos.logback.classic.Logger;
import ch.qos.logback.classic.spi.ILoggingEvent;
import ch.qos.logback.core.read.ListAppender;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.nio.charset.StandardCharsets;
import java.time.Clock;
import java.time.Instant;
import java.time.ZoneOffset;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.slf4j.LoggerFactory;

/** A wildcard family takes in at most max-ids distinct ids, however many topics a device invents. */
class FamilyCapTest {
    static final Instant NOW = Instant.parse("2026-07-14T13:05:00Z");
    final SimpleMeterRegistry registry = new SimpleMeterRegistry();
    final List<Reading> accepted = new ArrayList<>();
    final ListAppender<ILoggingEvent> log = new ListAppender<>();
    final Logger stageLogger = (Logger) LoggerFactory.getLogger(IngestStage.class);

    IngestStage stage(int maxIds) {
        log.start();
        stageLogger.addAppender(log);
        return new IngestStage(List.of(
                new SensorConfig("pen1-dry", "barn/pen1/dry", Quantity.DRY_BULB, Unit.C, PayloadFormat.NUMBER, null, 0, 1),
                new SensorConfig("hutch-dry", "larkmoor/hutches/+/dry", Quantity.DRY_BULB, Unit.C, PayloadFormat.NUMBER, null, 3, 2,
                        maxIds)), Clock.fixed(NOW, ZoneOffset.UTC), registry, accepted::add, 0);
    }

    @AfterEach
    void detach() {
        stageLogger.detachAppender(log);
    }

    Reading send(IngestStage stage, String topic) {
        return stage.accept(topic, "12.5".getBytes(StandardCharsets.UTF_8));
    }

    @Test
    void idsOverTheCapAreRefusedCountedAndLoggedOnce() {
        IngestStage stage = stage(3);
        for (int i = 1; i <= 10; i++) send(stage, "larkmoor/hutches/h" + i + "/dry");
        assertEquals(3, accepted.size());
        assertEquals(7.0, registry.counter("byre.readings.rejected", "reason", "id-limit").count());
        List<String> capLines = log.list.stream().map(ILoggingEvent::getFormattedMessage).filter(m -> m.contains("max-ids")).toList();
        assertEquals(1, capLines.size(), capLines.toString());
        assertTrue(capLines.get(0).contains("hutch-dry") && capLines.get(0).contains("3 distinct ids"), capLines.get(0));

        // the ids already taken in and the exact sensors go on as before
        assertNotNull(send(stage, "larkmoor/hutches/h2/dry"));
        assertNotNull(send(stage, "barn/pen1/dry"));
        assertNull(send(stage, "larkmoor/hutches/h11/dry"));
        assertEquals(8.0, registry.counter("byre.readings.rejected", "reason", "id-limit").count());
        assertEquals(3, stage.router().familySize("hutch-dry"));
    }

    @Test
    void theDefaultCapIsAFewHundred() {
        SensorConfig s = new SensorConfig("hutch-dry", "larkmoor/hutches/+/dry", Quantity.DRY_BULB, Unit.C, PayloadFormat.NUMBER, null, 3, 1);
        assertEquals(SensorConfig.DEFAULT_MAX_IDS, s.maxIds());
        assertTrue(s.maxIds() >= 100 && s.maxIds() <= 1000);
    }

    /**
     * Load: 60,000 distinct topics (about what killed the daemon before the cap). What stays in memory per
     * id (the router's ids, the per-sensor counters, the flood buckets) stops growing at the cap.
     */
    @Test
    void sixtyThousandInventedTopicsKeepMemoryFlat() {
        IngestStage stage = stage(SensorConfig.DEFAULT_MAX_IDS);
        int metersBefore = -1;
        for (int i = 0; i < 60_000; i++) {
            send(stage, "larkmoor/hutches/x" + i + "/dry");
            if (i == SensorConfig.DEFAULT_MAX_IDS) metersBefore = registry.getMeters().size();
        }
        assertEquals(SensorConfig.DEFAULT_MAX_IDS, accepted.size());
        assertEquals(SensorConfig.DEFAULT_MAX_IDS, stage.router().familySize("hutch-dry"));
        assertEquals(metersBefore, registry.getMeters().size(), "no meter per refused id");
        assertEquals(60_000.0 - SensorConfig.DEFAULT_MAX_IDS, registry.counter("byre.readings.rejected", "reason", "id-limit").count());
    }
}
