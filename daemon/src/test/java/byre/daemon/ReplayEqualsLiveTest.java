package byre.daemon;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.alerts.AlertEvent;
import byre.config.ByreConfig;
import byre.ingest.Reading;
import byre.mqtt.EmbeddedBroker;
import byre.rules.RuleCompiler;
import byre.rules.RuleSet;
import byre.testing.Configs;
import byre.testing.MutableClock;
import byre.testing.TestPublisher;
import byre.testing.WebhookReceiver;
import byre.units.Quantity;
import byre.zones.ClimateDeriver;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The same readings through MQTT into the running daemon (events out of a webhook) and through
 * {@link Replay} give the same events at the same times: one code path for live and replay.
 */
class ReplayEqualsLiveTest {
    @TempDir
    Path dir;

    static final String RULES = """
            watch calf-chill
              raise when @calves.wind-chill < 5 C for 20m
              clear when @calves.wind-chill > 7 C for 15m
              level critical
              notify hook
              remind every 30m
              message "Cold draught in {zone}: wind chill {value} {unit}."
            """;

    /** A cold, windy night in one pen, one reading a minute per sensor: 6 C falling to 2 C, wind 3 m/s, then calm and mild. */
    static List<Reading> night(Instant t0) {
        List<Reading> out = new ArrayList<>();
        for (int m = 0; m < 240; m++) {
            Instant t = t0.plusSeconds(60L * m);
            double dry = m < 120 ? 6 - m * 4.0 / 120 : Math.min(12, 2 + (m - 120) * 0.2);
            double air = m < 150 ? 3.0 : 0.2;
            out.add(new Reading("pen1-dry", Quantity.DRY_BULB, dry, t));
            out.add(new Reading("pen1-wet", Quantity.WET_BULB, dry - 1.0, t.plusSeconds(1)));
            out.add(new Reading("pen1-air", Quantity.AIR_SPEED, air, t.plusSeconds(2)));
        }
        return out;
    }

    @Test
    void liveAndReplayGiveTheSameEvents() throws Exception {
        Files.writeString(dir.resolve("calf.rules"), RULES);
        Instant t0 = Instant.parse("2026-01-12T20:00:00Z");
        List<Reading> readings = night(t0);
        int port = EmbeddedBroker.freePort("127.0.0.1");
        try (WebhookReceiver hook = new WebhookReceiver()) {
            String yaml = """
                    site: larkmoor
                    timezone: Europe/London
                    mqtt: { broker: embedded, listen: 127.0.0.1:%d, client-id: byre-replay-live }
                    sensors:
                      pen1-dry: { topic: t/pen1/dry, quantity: dry-bulb, payload: "json:v", time: "json:ts" }
                      pen1-wet: { topic: t/pen1/wet, quantity: wet-bulb, payload: "json:v", time: "json:ts" }
                      pen1-air: { topic: t/pen1/air, quantity: air-speed, payload: "json:v", time: "json:ts" }
                    zones:
                      calf-pen-1: { groups: [calves], sensors: [pen1-dry, pen1-wet, pen1-air] }
                    notify:
                      hook: { type: webhook, url: "%s", rate-limit: 100 }
                    rules: calf.rules
                    history: { path: history.db }
                    admin: { listen: 127.0.0.1:0 }
                    """.formatted(port, hook.url());
            ByreConfig cfg = Configs.parse("live.yaml", yaml, dir, n -> null);

            // Replay first: the reference.
            RuleSet rules = RuleCompiler.compile(RuleFiles.read(cfg.rulePaths()), new ConfigRuleContext(cfg)).ruleSet().orElseThrow();
            Replay replay = new Replay(rules, cfg.timezone(), cfg.site(), new ArrayList<>(cfg.zones().values()), new ClimateDeriver());
            List<AlertEvent> expected = new ArrayList<>();
            for (Reading r : readings) expected.addAll(replay.sensorReading(r));
            Instant end = readings.get(readings.size() - 1).at();
            expected.addAll(replay.advanceTo(end));
            List<String> want = expected.stream().map(ReplayEqualsLiveTest::summary).toList();
            assertTrue(want.stream().anyMatch(s -> s.startsWith("raised")), "the scenario must raise: " + want);
            assertTrue(want.stream().anyMatch(s -> s.startsWith("cleared")), "the scenario must clear: " + want);

            MutableClock clock = new MutableClock(t0);
            try (Daemon d = Daemon.create(cfg, clock, new SimpleMeterRegistry()).start(new ClimateDeriver());
                 TestPublisher pub = new TestPublisher("tcp://127.0.0.1:" + port)) {
                await().atMost(Duration.ofSeconds(15)).until(() -> d.link().isConnected());
                long sent = 0;
                for (Reading r : readings) {
                    clock.set(r.at());
                    String topic = "t/pen1/" + r.sensorId().substring(5);
                    pub.publish(topic, "{\"v\":" + r.value() + ",\"ts\":\"" + r.at() + "\"}");
                    long target = ++sent;
                    await().atMost(Duration.ofSeconds(10)).pollInterval(Duration.ofMillis(1)).until(() -> d.processed() >= target);
                }
                clock.set(end);
                await().atMost(Duration.ofSeconds(20)).untilAsserted(() ->
                        assertEquals(want, hook.bodies().stream().map(AlertEvent::fromJson).map(ReplayEqualsLiveTest::summary).toList()));
            }
        }
    }

    static String summary(AlertEvent e) {
        return e.kind().name().toLowerCase() + " " + e.watch() + " " + e.zone() + " at " + e.at();
    }
}
