package byre.daemon;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.config.ByreConfig;
import byre.mqtt.EmbeddedBroker;
import byre.rules.Watch;
import byre.testing.Configs;
import byre.zones.ClimateDeriver;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.attribute.FileTime;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The running daemon picks up an edited rule file within seconds, and keeps its rules when the edit is bad. */
class RuleReloadTest {
    @TempDir
    Path dir;

    static String watch(String name) {
        return "watch " + name + "\n  raise when cows.thi >= 72 for 30m\n  clear when cows.thi <= 70 for 20m\n  notify office\n";
    }

    List<String> names(Daemon d) {
        return d.watches().engine().rules().watches().stream().map(Watch::name).toList();
    }

    /** A cow shed with a dry bulb and RH, rules in rules.d, on the embedded broker at {@code port}. */
    ByreConfig config(int port, String clientId) throws Exception {
        String yaml = """
                site: larkmoor
                mqtt: { broker: embedded, listen: 127.0.0.1:%d, client-id: %s }
                sensors:
                  shed-thi-dry: { topic: t/dry, quantity: dry-bulb }
                  shed-rh: { topic: t/rh, quantity: rh }
                zones:
                  cows: { sensors: [shed-thi-dry, shed-rh] }
                notify:
                  office: { type: command, argv: [/bin/true] }
                rules: rules.d
                history: { path: history.db }
                """.formatted(port, clientId);
        return Configs.parse("byre.yaml", yaml, dir, n -> null);
    }

    void edit(Path file, String text, int secondsLater) throws Exception {
        Files.writeString(file, text);
        // Make the change visible even on file systems with coarse modification times.
        Files.setLastModifiedTime(file, FileTime.from(Instant.now().plusSeconds(secondsLater)));
    }

    @Test
    void editsAreLoadedAndBadEditsKeepTheOldRules() throws Exception {
        Path rules = Files.createDirectories(dir.resolve("rules.d"));
        Path heat = rules.resolve("heat.rules");
        Files.writeString(heat, watch("heat-stress"));
        ByreConfig cfg = config(EmbeddedBroker.freePort("127.0.0.1"), "byre-reload-test");
        try (Daemon d = Daemon.create(cfg, Clock.systemUTC(), new SimpleMeterRegistry()).start(new ClimateDeriver())) {
            assertEquals(List.of("heat-stress"), names(d));
            assertEquals(0, d.ruleReloads(true));
            edit(heat, watch("heat-stress") + "\n" + watch("heat-danger"), 5);
            // Each step first waits until the daemon has observably acted on the edit, then asserts.
            await().atMost(Duration.ofSeconds(10)).until(() -> d.ruleReloads(true) == 1);
            assertEquals(List.of("heat-stress", "heat-danger"), names(d));

            edit(heat, "watch broken\n  raise when cows.thii >= 72\n", 10);
            await().atMost(Duration.ofSeconds(10)).until(() -> d.ruleReloads(false) == 1); // the bad file was read and refused
            assertEquals(List.of("heat-stress", "heat-danger"), names(d), "a bad file keeps the running rules");
            assertEquals(1, d.ruleReloads(true));

            edit(rules.resolve("cold.rules"), watch("cold"), 15);
            edit(heat, watch("heat-stress"), 15);
            d.reload(); // SIGHUP does the same at once
            // (the 2 s check may see the two edits one at a time first: wait for the rules both give)
            await().atMost(Duration.ofSeconds(10)).until(() -> names(d).equals(List.of("cold", "heat-stress")));
        }
    }

    @Test
    void aReloadFirstWritesTheZoneRowsTheHistoryHoldsBackSoNewWindowsRefillUpToNow() throws Exception {
        Path rules = Files.createDirectories(dir.resolve("rules.d"));
        Path heat = rules.resolve("heat.rules");
        Files.writeString(heat, watch("heat-stress"));
        int port = EmbeddedBroker.freePort("127.0.0.1");
        ByreConfig cfg = config(port, "byre-reload-refill-test");
        Clock clock = midwayBetweenRollupWrites();
        // A history that has had its first rollup write (a new file's first batch is one): the daemon's writes below
        // then fall between two, so whether the zone rows are held does not depend on which batch they join.
        try (byre.history.HistoryStore store = byre.history.HistoryStore.open(dir.resolve("history.db"), clock);
             byre.history.HistoryWriter w = byre.history.HistoryWriter.start(store, byre.history.Retention.DEFAULT, clock)) {
            w.append(byre.history.StreamKey.sensor("shed-rh"), clock.millis() - 60_000, 70);
            assertTrue(w.flush());
        }
        try (Daemon d = Daemon.create(cfg, clock, new SimpleMeterRegistry()).start(new ClimateDeriver());
             byre.testing.TestPublisher sensor = new byre.testing.TestPublisher("tcp://127.0.0.1:" + port)) {
            await().atMost(Duration.ofSeconds(15)).until(() -> d.link().isConnected());
            sensor.publish("t/dry", "24.5");
            sensor.publish("t/rh", "70");
            await().atMost(Duration.ofSeconds(10)).until(() -> d.history().stats().rowsWritten() >= 2);
            Thread.sleep(600); // the zone's derived streams follow on the pipeline's next tick (four a second)
            long zoneRowsBefore = zoneRows(d);
            // A new watch with a window of its own: refilled from the history, which must hold the zone rows by then.
            edit(heat, watch("heat-stress") + "\nwatch warm-day\n  raise when avg(cows.thi, 30m) >= 60 for 1m\n  notify office\n", 5);
            await().atMost(Duration.ofSeconds(10)).until(() -> d.ruleReloads(true) == 1);
            assertEquals(0, zoneRowsBefore, "zone rows wait in memory for the next rollup write");
            assertTrue(zoneRows(d) > 0, "written before the new window was refilled");
        }
    }

    /**
     * The wall clock shifted to six minutes into a ten-minute period: closed minutes are written at one minute past
     * each ten (a minute's grace), so the next write is five minutes away, far beyond this test's few seconds.
     */
    static Clock midwayBetweenRollupWrites() {
        long period = Duration.ofMinutes(10).toMillis();
        long shift = Math.floorMod(Duration.ofMinutes(6).toMillis() - Math.floorMod(System.currentTimeMillis(), period), period);
        return Clock.offset(Clock.systemUTC(), Duration.ofMillis(shift));
    }

    static long zoneRows(Daemon d) {
        try (byre.history.HistoryReader r = d.store().openReader()) {
            return r.streams().stream().filter(k -> k.kind() == byre.history.StreamKey.Kind.ZONE)
                    .mapToLong(k -> r.raw(k, null, null).size()).sum();
        }
    }
}
