package byre.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;

import byre.admin.OpenAlert;
import byre.config.ByreConfig;
import byre.history.StreamKey;
import byre.testing.Configs;
import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/** {@code byre history} and {@code byre status} on a central byre, per site. */
class CentralCliTest {
    static final Instant NOW = Instant.parse("2026-07-14T13:35:00Z");

    static ByreConfig central() throws Exception {
        return Configs.parse("central.yaml", """
                site: hub
                central:
                  sites:
                    larkmoor: { zones: [calf-pen-1, cow-shed], groups: [dairy] }
                    brackenhill: { zones: [cow-shed], groups: [dairy] }
                """, Path.of("."), k -> null);
    }

    @Test
    void historyOfASitesZoneIsEveryValueTheSitePublished() throws Exception {
        ByreConfig c = central();
        HistoryCommand.Query q = HistoryCommand.resolve(c, "larkmoor/cow-shed", "thi", null, "-1d", "now", null, NOW);
        assertEquals(StreamKey.sensor("larkmoor/cow-shed/thi"), q.key());
        assertEquals(StreamKey.sensor("larkmoor/online"), HistoryCommand.resolve(c, "larkmoor", "online", null, "-1d", "now", null, NOW).key());
    }

    @Test
    void statusForOneSiteKeepsItsZonesAndAlerts() throws Exception {
        StatusData all = new StatusData(StatusData.Daemon.UNREACHABLE, List.of(zone("larkmoor"), zone("larkmoor/cow-shed"),
                zone("brackenhill/cow-shed"), zone("larkmoor-east/cow-shed")),
                List.of(alert("i1", "larkmoor/cow-shed"), alert("i2", "brackenhill/cow-shed"), alert("i3", "larkmoor")),
                "from the daemon", List.of());
        StatusData one = StatusCommand.forSite(all, "larkmoor");
        assertEquals(List.of("larkmoor", "larkmoor/cow-shed"), one.zones().stream().map(StatusData.Zone::id).toList());
        assertEquals(List.of("i1", "i3"), one.alerts().stream().map(OpenAlert::incident).toList());
    }

    @org.junit.jupiter.api.io.TempDir
    Path dir;

    @Test
    void statusNamesAnUnknownSite() throws Exception {
        Path cfg = dir.resolve("central.yaml");
        java.nio.file.Files.writeString(cfg, "site: hub\ncentral:\n  sites:\n    larkmoor: { zones: [cow-shed] }\n"
                + "history: { path: " + dir.resolve("h.db") + " }\n");
        CliRun r = CliRun.of("status", "--config", cfg.toString(), "--site", "larkmor");
        assertEquals(Main.USAGE, r.code());
        assertEquals(true, r.err().contains("--site larkmor: not a site of this central byre's configuration (did you mean 'larkmoor'?)"), r.err());
    }

    @Test
    void checkAcceptsACentralConfigurationAndItsRules() throws Exception {
        Path rules = java.nio.file.Files.createDirectories(dir.resolve("rules.d"));
        java.nio.file.Files.writeString(rules.resolve("sites.rules"), """
                watch site-down
                  raise when @sites.online == 0 for 10m
                  clear when @sites.online == 1 for 2m
                  notify office
                watch dairy-heat
                  raise when @dairy.thi >= 72 for 30m
                  clear when @dairy.thi <= 70 for 20m
                  notify office
                """);
        Path cfg = dir.resolve("central.yaml");
        java.nio.file.Files.writeString(cfg, """
                site: hub
                central:
                  sites:
                    larkmoor: { zones: [calf-barn, cow-shed], groups: [dairy] }
                    brackenhill: { zones: [cow-shed], groups: [dairy] }
                notify:
                  office: { type: command, argv: [/bin/true] }
                rules: rules.d
                history: { path: h.db }
                """);
        CliRun r = CliRun.of("check", "--config", cfg.toString());
        assertEquals(Main.OK, r.code(), r.out() + r.err());
    }

    @Test
    void statusAndHistoryKnowASiteFoundOnTheBroker() throws Exception {
        Path cfg = dir.resolve("central.yaml");
        java.nio.file.Files.writeString(cfg, "site: hub\ncentral:\n  discover: true\n  defaults: { zones: [cow-shed] }\n"
                + "history: { path: " + dir.resolve("h.db") + " }\n");
        Instant at = Instant.now().minusSeconds(30);
        try (byre.history.HistoryStore store = byre.history.HistoryStore.open(dir.resolve("h.db"))) {
            store.putState(byre.central.FoundSites.PREFIX + "fellside", at.toString());
            var w = byre.history.HistoryWriter.start(store, new byre.history.Retention(Duration.ofDays(14), Duration.ofDays(90),
                    Duration.ofDays(1825)), java.time.Clock.systemUTC());
            w.append(StreamKey.zone("fellside/cow-shed", byre.units.Quantity.DRY_BULB), at, 21.5);
            w.append(StreamKey.sensor("fellside/cow-shed/dry-bulb"), at, 21.5);
            w.flush();
            w.close();
        }
        CliRun r = CliRun.of("status", "--config", cfg.toString(), "--site", "fellside", "--no-color");
        assertEquals(Main.OK, r.code(), r.out() + r.err());
        assertEquals(true, r.out().contains("fellside/cow-shed") && r.out().contains("21.5"), r.out());
        CliRun h = CliRun.of("history", "--config", cfg.toString(), "--zone", "fellside/cow-shed", "--quantity", "dry-bulb", "--from", "-1h");
        assertEquals(Main.OK, h.code(), h.out() + h.err());
        assertEquals(true, h.out().contains("21.5"), h.out());
        CliRun unknown = CliRun.of("status", "--config", cfg.toString(), "--site", "fellsde");
        assertEquals(true, unknown.err().contains("(did you mean 'fellside'?)"), unknown.err());
    }

    static StatusData.Zone zone(String id) {
        return new StatusData.Zone(id, List.of(), Duration.ofMinutes(5), Map.of(), Map.of());
    }

    static OpenAlert alert(String incident, String zone) {
        return new OpenAlert(incident, "heat-stress", zone, "warning", "thi", 73.4, NOW, null, null);
    }

    @Test
    void statusWhileTheCentreIsDownShowsTheSitesOpenAlertsFromTheStoredEvents() throws Exception {
        Path cfg = dir.resolve("central.yaml");
        java.nio.file.Files.writeString(cfg, "site: hub\ncentral:\n  sites:\n    larkmoor: { zones: [cow-shed] }\n"
                + "admin: { listen: 127.0.0.1:" + byre.mqtt.EmbeddedBroker.freePort("127.0.0.1") + " }\n"
                + "history: { path: " + dir.resolve("h.db") + " }\n");
        String raised = "{\"id\":\"e1\",\"incident\":\"i7\",\"event\":\"raised\",\"site\":\"larkmoor\",\"watch\":\"heat-stress\","
                + "\"zone\":\"cow-shed\",\"level\":\"warning\",\"quantity\":\"thi\",\"value\":73.4,\"unit\":\"\","
                + "\"since\":\"2026-07-14T13:05:00Z\",\"at\":\"2026-07-14T13:35:00Z\",\"message\":\"Heat stress\"}";
        try (byre.history.HistoryStore store = byre.history.HistoryStore.open(dir.resolve("h.db"));
             byre.central.SiteEventLog log = new byre.central.SiteEventLog(store.openSyncedConnection())) {
            log.record("larkmoor", byre.alerts.AlertEvent.fromJson(raised), raised, Instant.now());
        }
        CliRun r = CliRun.of("status", "--config", cfg.toString(), "--site", "larkmoor", "--no-color");
        assertEquals(Main.OK, r.code(), r.out() + r.err());
        assertEquals(true, r.out().contains("heat-stress") && r.out().contains("larkmoor/cow-shed"), r.out());
        assertEquals(true, r.out().contains("the daemon is not answering"), r.out());
    }
}
