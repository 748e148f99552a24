package byre.page;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.admin.LiveValues;
import byre.alerts.AlertEvent;
import byre.alerts.AlertPolicy;
import byre.alerts.EventKind;
import byre.alerts.IdSource;
import byre.alerts.IncidentBook;
import byre.alerts.OpenIncident;
import byre.alerts.WatchOutcome;
import byre.central.CentralConsumer;
import byre.config.ByreConfig;
import byre.history.HistoryStore;
import byre.history.HistoryWriter;
import byre.history.Retention;
import byre.history.StreamKey;
import byre.mqtt.MqttLink;
import byre.rules.ZoneReading;
import byre.testing.Configs;
import byre.testing.MutableClock;
import byre.units.Quantity;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.stream.Collectors;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * What a central byre's pages gather, from a real SQLite history, the consumer's own event log and link state (its
 * broker link is never started here): each site's alerts (its own and the centre's in its zones), values live or
 * else from what the site published, how long since it was heard from, and the centre's own zones as one more site.
 */
class CentralPageSourceTest {
    static final Instant NOW = Instant.parse("2026-07-14T13:05:00Z");
    static final AlertPolicy POLICY = new AlertPolicy(List.of("office"), null, null, List.of());

    @TempDir
    Path dir;

    final MutableClock clock = new MutableClock(NOW);
    final IncidentBook book = new IncidentBook("hub", IdSource.counting());
    final LiveValues live = new LiveValues();
    HistoryStore store;
    MqttLink link;
    CentralConsumer central;
    CentralPageSource source;

    @BeforeEach
    void open() throws Exception {
        ByreConfig cfg = Configs.parse("central.yaml", """
                site: hub
                sensors:
                  office-dry: { topic: hub/office/dry, quantity: dry-bulb }
                zones:
                  office: { sensors: [office-dry] }
                central:
                  sites:
                    larkmoor:    { zones: [calf-barn, cow-shed] }
                    brackenhill: { zones: [cow-shed], max-age: 3m }
                history: { path: central.db }
                """, dir, n -> null);
        store = HistoryStore.open(dir.resolve("central.db"), clock);
        HistoryWriter w = HistoryWriter.start(store, new Retention(Duration.ofDays(14), Duration.ofDays(90), Duration.ofDays(1825)), clock);
        // Brackenhill's last value, as it published it two hours ago: stored, never live here.
        w.append(StreamKey.sensor("brackenhill/cow-shed/thi"), NOW.minus(Duration.ofMinutes(125)), 70.2);
        w.flush();
        w.close();
        link = new MqttLink(cfg.mqtt(), cfg.site(), new SimpleMeterRegistry());
        central = new CentralConsumer(cfg, link, store.openSyncedConnection(), clock, new SimpleMeterRegistry(), r -> { });
        BarnPageSource zones = new BarnPageSource(cfg, live, store::openReader, book::openIncidents);
        source = CentralPageSource.of(cfg, central, zones, store::openReader, book::openIncidents);
    }

    @AfterEach
    void close() {
        central.close();
        store.close();
    }

    void raise(String watch, String zone, String level) {
        book.accept(new WatchOutcome(WatchOutcome.Kind.RAISED, watch, zone, level, null, Double.NaN, "", NOW.minusSeconds(600),
                NOW.minusSeconds(600), watch + " in " + zone, POLICY));
    }

    void siteEvent(String site, String id, String incident, EventKind kind, String zone, String by) throws Exception {
        AlertEvent e = new AlertEvent(id, incident, kind, site, "heat-stress", zone, "warning", "thi", 81.4, "", NOW.minusSeconds(2520),
                NOW.minusSeconds(2400), "Heat stress in " + zone, by, List.of(), List.of());
        central.events().record(site, e, e.toJson(), NOW);
    }

    static Set<String> ids(SitesView.Site s) {
        return s.alerts().stream().map(OpenIncident::id).collect(Collectors.toSet());
    }

    static Map<String, SitesView.Site> byId(SitesView v) {
        return v.sites().stream().collect(Collectors.toMap(SitesView.Site::id, s -> s));
    }

    @Test
    void eachSiteHasItsOwnAlertsAndTheCentresInItsZones() throws Exception {
        siteEvent("larkmoor", "e1", "k7m2xq9rtb", EventKind.RAISED, "cow-shed", null);
        siteEvent("larkmoor", "e2", "p4w8zn2kcd", EventKind.RAISED, null, null); // an alert of the barn itself, no zone
        raise("site-down", "brackenhill", "critical");
        raise("dairy-heat", "larkmoor/cow-shed", "warning");
        raise("office-cold", "office", "info");
        raise("channel-failing", null, "warning");
        Map<String, SitesView.Site> sites = byId(source.list(NOW));
        assertEquals(List.of("larkmoor", "brackenhill", "hub"), source.list(NOW).sites().stream().map(SitesView.Site::id).toList(),
                "the configuration's order (the page sorts), the centre's own zones last");
        assertEquals(Set.of("k7m2xq9rtb", "p4w8zn2kcd", "i2"), ids(sites.get("larkmoor")), "its own two and the centre's dairy-heat");
        assertEquals("larkmoor", sites.get("larkmoor").alerts().stream().filter(a -> a.id().equals("p4w8zn2kcd")).findFirst().orElseThrow().zone(),
                "an alert of no zone belongs to the site itself");
        assertEquals(List.of("site-down"), sites.get("brackenhill").alerts().stream().map(OpenIncident::watch).toList());
        assertEquals(Set.of("i3", "i4"), ids(sites.get("hub")), "the centre's own in its own zone or in none");
        assertTrue(sites.get("hub").state().self());
        // Acknowledging: the site's incident goes to the site, the centre's own stays here.
        assertEquals("larkmoor", source.siteOf("k7m2xq9rtb"));
        assertNull(source.siteOf("i1"));
        assertEquals(6, source.open().size(), "every incident the page may acknowledge, the centre's four and larkmoor's two: " + source.open());
    }

    @Test
    void valuesAreLiveOrWhatTheSiteLastPublishedAndTheLinkSaysWhenItWasHeard() {
        live.accept(new ZoneReading(NOW.minusSeconds(40), "larkmoor/cow-shed", Quantity.THI, 81.4));
        central.links().accept("byre/larkmoor/status", "online".getBytes(StandardCharsets.UTF_8));
        central.links().accept("byre/brackenhill/status", "offline".getBytes(StandardCharsets.UTF_8));
        clock.set(NOW.minusSeconds(10));
        central.links().heard("larkmoor", false);
        clock.set(NOW);
        central.links().heard("larkmoor", true); // a retained message says nothing about when the site last spoke
        Map<String, SitesView.Site> sites = byId(source.list(NOW));
        SitesView.Site lark = sites.get("larkmoor");
        assertEquals(BarnView.SiteState.of(true, NOW.minusSeconds(10)), lark.state());
        assertEquals(List.of("larkmoor/calf-barn", "larkmoor/cow-shed"), lark.zones().stream().map(BarnView.Zone::id).toList());
        assertEquals(81.4, lark.zones().get(1).values().get(Quantity.THI).value());
        assertTrue(lark.zones().get(0).values().isEmpty());
        SitesView.Site bracken = sites.get("brackenhill");
        BarnView.Value last = bracken.zones().get(0).values().get(Quantity.THI);
        assertEquals(70.2, last.value(), "too old to be live when it came: from the stream the site published");
        assertEquals(BarnView.SiteState.of(false, NOW.minus(Duration.ofMinutes(125))), bracken.state(), "heard from when it measured that");
        assertEquals(Duration.ofMinutes(3), bracken.zones().get(0).maxAge());
    }

    @Test
    void aSitesPageHasItsZonesWithTrendsAndAlertsAndAnUnknownSiteHasNone() throws Exception {
        siteEvent("larkmoor", "e1", "k7m2xq9rtb", EventKind.RAISED, "cow-shed", null);
        siteEvent("larkmoor", "e2", "k7m2xq9rtb", EventKind.ACKNOWLEDGED, "cow-shed", "Sam");
        BarnView v = source.site("brackenhill", NOW).orElseThrow();
        assertEquals(List.of("brackenhill/cow-shed"), v.zones().stream().map(BarnView.Zone::id).toList());
        assertEquals(70.2, v.zones().get(0).values().get(Quantity.THI).value());
        assertFalse(v.state().self());
        BarnView lark = source.site("larkmoor", NOW).orElseThrow();
        assertEquals("Sam", lark.alerts().get(0).ackBy(), "the barn's acknowledgement, as it reported it");
        assertEquals("Heat stress in cow-shed", lark.alerts().get(0).message());
        BarnView own = source.site("hub", NOW).orElseThrow();
        assertTrue(own.state().self());
        assertEquals(List.of("office"), own.zones().stream().map(BarnView.Zone::id).toList());
        assertEquals(List.of("office-dry"), own.silent().stream().map(BarnView.Silent::sensor).toList(), "the centre's own sensors can go silent");
        assertTrue(source.site("nowhere", NOW).isEmpty());
        assertTrue(source.site("larkmoor/cow-shed", NOW).isEmpty());
    }
}
