package byre.daemon;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.config.ByreConfig;
import byre.config.ConfigException;
import byre.json.Json;
import byre.mqtt.EmbeddedBroker;
import byre.testing.ConfigYaml;
import byre.testing.Configs;
import byre.testing.TestPublisher;
import byre.zones.ClimateDeriver;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.util.List;
import java.util.Map;
import java.util.concurrent.CopyOnWriteArrayList;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * What a central byre reads from a barn: every alert event on {@code byre/<site>/events} (QoS 1, not retained),
 * whatever channels its watch names, and zone streams paced by {@code mqtt.publish-every}.
 */
class SiteEventsTest {
    @TempDir
    Path dir;

    String yaml(int port, String extraMqtt) {
        return ConfigYaml.barn().embeddedBroker(port).clientId("byre-events-test").mqttOptions(extraMqtt)
                .sensor("shed-dry", "larkmoor/cow-shed/dry", "dry-bulb").zone("cow-shed", "shed-dry").rules("rules.d")
                .history("history.db").text();
    }

    @Test
    void everyEventOfAnEpisodeIsPublishedInOrder() throws Exception {
        Path rules = Files.createDirectories(dir.resolve("rules.d"));
        Files.writeString(rules.resolve("warm.rules"),
                "watch shed-warm\n  raise when cow-shed.dry-bulb > 30\n  clear when cow-shed.dry-bulb < 28\n  notify office\n");
        int port = EmbeddedBroker.freePort("127.0.0.1");
        ByreConfig cfg = Configs.parse("byre.yaml", yaml(port, ""), dir, n -> null);
        assertTrue(cfg.mqtt().publishEvents(), "on unless turned off");
        List<Map<?, ?>> events = new CopyOnWriteArrayList<>();
        List<Boolean> retainedFlags = new CopyOnWriteArrayList<>();
        try (Daemon d = Daemon.create(cfg, Clock.systemUTC(), new SimpleMeterRegistry()).start(new ClimateDeriver());
             TestPublisher sensor = new TestPublisher("tcp://127.0.0.1:" + port);
             TestPublisher centre = new TestPublisher("tcp://127.0.0.1:" + port)) {
            centre.client().subscribe("byre/larkmoor/events", 1, (t, m) -> {
                events.add((Map<?, ?>) Json.parse(new String(m.getPayload(), StandardCharsets.UTF_8)));
                retainedFlags.add(m.isRetained());
            });
            sensor.publish("larkmoor/cow-shed/dry", "31.5");
            await().atMost(Duration.ofSeconds(15)).until(() -> events.size() == 1);
            sensor.publish("larkmoor/cow-shed/dry", "26.0");
            await().atMost(Duration.ofSeconds(15)).until(() -> events.size() == 2);
        }
        assertEquals(List.of("raised", "cleared"), events.stream().map(e -> e.get("event")).toList());
        assertEquals(events.get(0).get("incident"), events.get(1).get("incident"), "one incident for the episode");
        assertEquals("shed-warm", events.get(0).get("watch"));
        assertEquals("cow-shed", events.get(0).get("zone"));
        assertFalse(retainedFlags.contains(true), "events are not retained");
    }

    @Test
    void publishingIsConfigured() throws Exception {
        ByreConfig cfg = Configs.parse("byre.yaml", yaml(1883, ", publish-events: false, publish-every: 1m"), dir, n -> null);
        assertFalse(cfg.mqtt().publishEvents());
        assertEquals(Duration.ofMinutes(1), cfg.mqtt().publishEvery());
        assertEquals(Duration.ofSeconds(1), Configs.parse("byre.yaml", yaml(1883, ""), dir, n -> null).mqtt().publishEvery());

        ConfigException bad = assertThrows(ConfigException.class,
                () -> Configs.parse("byre.yaml", yaml(1883, ", publish-events: sometimes"), dir, n -> null));
        assertTrue(bad.getMessage().contains("byre.yaml:2:96: mqtt.publish-events must be true or false, not 'sometimes'"), bad.getMessage());
        ConfigException slash = assertThrows(ConfigException.class, () -> Configs.parse("byre.yaml",
                yaml(1883, "").replace("office:", "byre/larkmoor/events:"), dir, n -> null));
        assertTrue(slash.getMessage().contains("byre.yaml:8:3: channel name 'byre/larkmoor/events' may not contain '/'"), slash.getMessage());
    }
}
