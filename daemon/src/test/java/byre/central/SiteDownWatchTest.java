package byre.central;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertFalse;

import byre.config.ByreConfig;
import byre.daemon.Daemon;
import byre.mqtt.EmbeddedBroker;
import byre.testing.ConfigYaml;
import byre.testing.MutableClock;
import byre.testing.TestPublisher;
import byre.units.Quantity;
import byre.zones.ClimateDeriver;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** "Site offline" with a hold time really fires at a central byre: the clock is the test's, the broker the embedded one. */
class SiteDownWatchTest {
    @TempDir
    Path dir;

    @Test
    void aSiteOfflineLongerThanTheHoldTimeRaisesItsAlert() throws Exception {
        Files.createDirectories(dir.resolve("rules.d"));
        Files.writeString(dir.resolve("rules.d/sites.rules"), """
                watch site-down
                  raise when @sites.online == 0 for 5m
                  clear when @sites.online == 1 for 1m
                  level critical
                  notify office
                """);
        int port = EmbeddedBroker.freePort("127.0.0.1");
        ByreConfig cfg = ConfigYaml.centre().embeddedBroker(port).site("larkmoor", "zones: [cow-shed], groups: [dairy]")
                .rules("rules.d").parse("central.yaml", dir);
        MutableClock clock = new MutableClock(Instant.parse("2026-07-14T02:00:00Z"));
        try (Daemon centre = Daemon.create(cfg, clock, new SimpleMeterRegistry()).start(new ClimateDeriver());
             TestPublisher bridge = new TestPublisher("tcp://127.0.0.1:" + port)) {
            CentralConsumer hub = centre.central();
            bridge.publish("byre/larkmoor/status", "online", 1, true);
            await().atMost(15, TimeUnit.SECONDS).until(() -> centre.zones().latest("larkmoor", Quantity.ONLINE) == 1.0);

            clock.advance(Duration.ofMinutes(1));
            bridge.publish("byre/larkmoor/uplink", "0", 1, true); // the central broker's will for the barn's bridge
            await().atMost(15, TimeUnit.SECONDS).until(() -> centre.zones().latest("larkmoor", Quantity.ONLINE) == 0.0);
            clock.advance(Duration.ofMinutes(4));
            hub.links().refresh();
            await().atMost(15, TimeUnit.SECONDS).until(() -> centre.zones().latestAt("larkmoor", Quantity.ONLINE)
                    .equals(Instant.parse("2026-07-14T02:05:00Z")));
            centre.flush();
            assertFalse(siteDownOpen(centre), "4 minutes offline: still within the 5-minute hold");

            clock.advance(Duration.ofMinutes(2));
            hub.links().refresh();
            await().atMost(15, TimeUnit.SECONDS).until(() -> siteDownOpen(centre));
        }
    }

    static boolean siteDownOpen(Daemon centre) {
        return centre.alerts().book().openIncidents().stream().anyMatch(i -> i.watch().equals("site-down") && i.zone().equals("larkmoor"));
    }
}
