package byre.central;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.config.ByreConfig;
import byre.config.ConfigException;
import byre.daemon.ConfigRuleContext;
import byre.rules.CompileResult;
import byre.rules.RuleCompiler;
import byre.rules.RuleSource;
import byre.testing.Configs;
import byre.units.Quantity;
import java.nio.file.Path;
import java.util.List;
import org.junit.jupiter.api.Test;

/** The {@code central:} section: the zones and streams it makes, and rules over them, checked as {@code byre check} does. */
class CentralConfigTest {
    static final String CENTRAL = """
            site: hub
            central:
              sites:
                larkmoor: { zones: [calf-pen-1, cow-shed], groups: [dairy] }
                brackenhill: { zones: [cow-shed], groups: [dairy, beef], max-age: 3m }
            notify:
              office: { type: command, argv: [/bin/true] }
            """;

    static ByreConfig load(String text) throws ConfigException {
        return Configs.parse("central.yaml", text, Path.of("."), k -> null);
    }

    static CompileResult compile(ByreConfig c, String rules) {
        return RuleCompiler.compile(List.of(new RuleSource("sites.rules", rules)), new ConfigRuleContext(c));
    }

    @Test
    void eachSiteZoneBecomesACentralZoneAndEachSiteHasItsOnlineStream() throws Exception {
        ByreConfig c = load(CENTRAL);
        assertTrue(c.central().enabled());
        assertEquals(List.of("larkmoor/calf-pen-1", "larkmoor/cow-shed", "larkmoor", "brackenhill/cow-shed", "brackenhill"),
                List.copyOf(c.zones().keySet()));
        assertEquals(List.of("dairy", "beef"), c.zones().get("brackenhill/cow-shed").groups());
        assertEquals(List.of("sites"), c.zones().get("larkmoor").groups());
        assertEquals(java.time.Duration.ofMinutes(3), c.zones().get("brackenhill/cow-shed").maxAge());
        // Fed by the site's own published topics, value and time from the JSON.
        var thi = c.sensors().get("larkmoor/cow-shed/thi");
        assertEquals("byre/larkmoor/zones/cow-shed/thi", thi.topic());
        assertEquals(Quantity.THI, thi.quantity());
        assertEquals("value", thi.payload().selector());
        assertEquals("at", thi.timePath());
        assertEquals(Quantity.ONLINE, c.sensors().get("larkmoor/online").quantity());
        assertFalse(c.sensors().containsKey("larkmoor/cow-shed/online"), "a mirrored zone has no online stream");
        // Learnt max-ages replace the zones (byre.daemon.Freshness): the sites stay.
        assertEquals(c.central(), c.withZones(c.zones()).central());
    }

    @Test
    void aSitesZoneDerivesNothingAndAnyOtherZoneAsUsual() throws Exception {
        ByreConfig c = load(CENTRAL + """
                sensors:
                  office-dry: { topic: hub/office/dry, quantity: dry-bulb }
                  office-rh: { topic: hub/office/rh, quantity: rh }
                zones:
                  office: { sensors: [office-dry, office-rh] }
                """);
        var stage = new byre.zones.ZoneStage(List.copyOf(c.zones().values()),
                CentralDeriver.wrap(c.central(), new byre.zones.ClimateDeriver()), new byre.zones.ZoneStage.Observer() {
                    @Override public void wetBulbAboveDryBulb(String zone, double excessC) {}
                    @Override public void derivationSkipped(String zone, String why) {}
                    @Override public void derived(String zone) {}
                });
        List<byre.rules.ZoneReading> out = new java.util.ArrayList<>();
        java.time.Instant t = java.time.Instant.parse("2026-07-14T13:00:00Z");
        stage.accept(new byre.ingest.Reading("larkmoor/cow-shed/dry-bulb", Quantity.DRY_BULB, 30, t), out::add);
        stage.accept(new byre.ingest.Reading("larkmoor/cow-shed/rh", Quantity.RH, 60, t.plusSeconds(2)), out::add);
        stage.accept(new byre.ingest.Reading("office-dry", Quantity.DRY_BULB, 30, t), out::add);
        stage.accept(new byre.ingest.Reading("office-rh", Quantity.RH, 60, t.plusSeconds(2)), out::add);
        assertEquals(List.of(Quantity.DRY_BULB, Quantity.RH), out.stream().filter(r -> r.zone().equals("larkmoor/cow-shed"))
                .map(byre.rules.ZoneReading::quantity).toList(), "the site's THI comes from the site, not from here");
        assertTrue(out.stream().anyMatch(r -> r.zone().equals("office") && r.quantity() == Quantity.THI), "the centre's own zone derives");
    }

    /** Watches over a group of sites' zones and over a glob of them. */
    static final String GROUP_AND_GLOB = """
            watch dairy-heat
              raise when @dairy.thi >= 72
              clear when @dairy.thi <= 70
              notify office
            watch sheds-cold
              raise when */cow-shed.dry-bulb < 2 C
              clear when */cow-shed.dry-bulb > 4 C
              notify office
            """;

    /** A watch over every site's online stream. */
    static final String SITE_DOWN = """
            watch site-down
              raise when @sites.online == 0 for 5m
              clear when @sites.online == 1 for 1m
              notify office
            """;

    @Test
    void rulesSelectSitesZonesByNameGlobAndGroup() throws Exception {
        ByreConfig c = load(CENTRAL);
        CompileResult ok = compile(c, GROUP_AND_GLOB + """
                watch one-pen
                  raise when larkmoor/calf-pen-1.wind-chill < 5 C
                  clear when larkmoor/calf-pen-1.wind-chill > 7 C
                  notify office
                """ + SITE_DOWN + """
                watch larkmoor-down
                  raise when larkmoor.online == 0
                  clear when larkmoor.online == 1
                  notify office
                """);
        assertFalse(ok.hasErrors(), ok.render());
        assertTrue(ok.warnings().isEmpty(), "no zone skipped, no zone lacking a stream: " + ok.render());
        assertEquals(List.of("larkmoor/calf-pen-1", "larkmoor/cow-shed", "brackenhill/cow-shed"), zonesOf(ok, "dairy-heat"));
        assertEquals(List.of("larkmoor/cow-shed", "brackenhill/cow-shed"), zonesOf(ok, "sheds-cold"));
        assertEquals(List.of("larkmoor", "brackenhill"), zonesOf(ok, "site-down"));
    }

    static List<String> zonesOf(CompileResult r, String watch) {
        return r.ruleSet().orElseThrow().watches().stream().filter(w -> w.name().equals(watch)).findFirst().orElseThrow().zones();
    }

    @Test
    void aStreamAZoneCanNeverHaveIsAnErrorThatSaysWhy() throws Exception {
        ByreConfig c = load(CENTRAL);
        CompileResult thiOfSite = compile(c, "watch w\n  raise when larkmoor.thi > 70\n  notify office\n");
        assertTrue(thiOfSite.render().contains("larkmoor is a site's own zone: its one stream is 'online'"), thiOfSite.render());
        CompileResult onlineOfZone = compile(c, "watch w\n  raise when larkmoor/cow-shed.online == 0\n  notify office\n");
        assertTrue(onlineOfZone.hasErrors(), onlineOfZone.render());
    }

    @Test
    void mistakesInTheSectionAreListedWithTheirLineAndColumn() {
        ConfigException e = assertThrows(ConfigException.class, () -> load("""
                site: hub
                central:
                  sites:
                    larkmoor: { zone: [cow-shed] }
                    hub: { zones: [cow-shed] }
                    brackenhill: { zones: [cow-shed], groups: [sites] }
                """));
        String m = e.getMessage();
        assertTrue(m.contains("central.yaml:4:17: unknown key 'zone' in site larkmoor (did you mean 'zones'?)"), m);
        assertTrue(m.contains("central.yaml:4:15: site larkmoor lists no zones"), m);
        assertTrue(m.contains("central.yaml:5:5: site 'hub' is this byre's own site"), m);
        assertTrue(m.contains("central.yaml:6:48: group 'sites' is every site's own zone"), m);
        ConfigException none = assertThrows(ConfigException.class, () -> load("site: hub\ncentral:\n  site: {}\n"));
        assertTrue(none.getMessage().contains("unknown key 'site' in central (did you mean 'sites'?)"), none.getMessage());
        assertTrue(none.getMessage().contains("central: lists no sites and does not discover them"), none.getMessage());
    }

    static final String DISCOVERING = """
            site: hub
            central:
              discover: true
              defaults: { zones: [calf-barn, cow-shed], groups: [dairy], max-age: 3m }
              sites:
                larkmoor: { groups: [dairy, beef] }
                brackenhill: { zones: [cow-shed] }
            notify:
              office: { type: command, argv: [/bin/true] }
            """;

    @Test
    void defaultsFillWhatASiteLeavesOutAndAreWhatAFoundSiteGets() throws Exception {
        ByreConfig c = load(DISCOVERING);
        assertTrue(c.central().discover());
        assertEquals(List.of("calf-barn", "cow-shed"), c.central().sites().get("larkmoor").zones(), "the defaults' zones");
        assertEquals(List.of("dairy", "beef"), c.central().sites().get("larkmoor").groups(), "its own groups");
        assertEquals(List.of("dairy"), c.zones().get("brackenhill/cow-shed").groups());
        assertEquals(java.time.Duration.ofMinutes(3), c.zones().get("brackenhill/cow-shed").maxAge());
        // A site found on the broker: the defaults, its sensors and zones as a listed site's.
        ByreConfig more = c.withCentralSites(List.of(c.central().found("fellside")));
        assertEquals(List.of("larkmoor", "brackenhill", "fellside"), List.copyOf(more.central().siteIds()));
        assertTrue(more.central().isMirroredZone("fellside/cow-shed") && more.central().isSiteZone("fellside"));
        assertEquals("byre/fellside/zones/calf-barn/thi", more.sensors().get("fellside/calf-barn/thi").topic());
        assertEquals(List.of("sites"), more.zones().get("fellside").groups());
        assertEquals(c.central().defaults().maxAge(), more.zones().get("fellside/cow-shed").maxAge());
        assertFalse(c.central().isSiteZone("fellside"), "the file's configuration is unchanged");
        // Discovering alone is a complete central section.
        assertTrue(load("site: hub\ncentral: { discover: true }\n").central().enabled());
    }

    @Test
    void mistakesInDiscoveryAreListedWithTheirLine() {
        ConfigException e = assertThrows(ConfigException.class, () -> load("""
                site: hub
                central:
                  discover: yes please
                  defaults: { zones: [cow shed], groups: [sites], max-ages: 5m }
                  sites:
                    larkmoor: {}
                """));
        String m = e.getMessage();
        assertTrue(m.contains("central.yaml:3:13: central.discover must be true or false, not 'yes please'"), m);
        assertTrue(m.contains("central.yaml:4:23: zone id 'cow shed' must be letters"), m);
        assertTrue(m.contains("central.yaml:4:43: group 'sites' is every site's own zone"), m);
        assertTrue(m.contains("central.yaml:4:51: unknown key 'max-ages' in central.defaults (did you mean 'max-age'?)"), m);
        assertTrue(m.contains("central.yaml:6:15: site larkmoor lists no zones (zones: [cow-shed, calf-pen-1]), and central.defaults gives none"), m);
    }

    @Test
    void whileDiscoveringAGroupOrGlobWithoutZonesYetIsAWarning() throws Exception {
        String rules = SITE_DOWN + GROUP_AND_GLOB;
        String empty = "site: hub\ncentral:\n  discover: true\n  defaults: { zones: [cow-shed], groups: [dairy] }\n"
                + "notify:\n  office: { type: command, argv: [/bin/true] }\n";
        CompileResult found = compile(load(empty), rules);
        assertFalse(found.hasErrors(), found.render());
        assertTrue(found.render().contains("group '@sites' has no zones yet; the sites found later join it"), found.render());
        assertTrue(found.render().contains("selector '*/cow-shed' matches no zone yet"), found.render());
        assertEquals(List.of(), zonesOf(found, "site-down"));
        CompileResult typo = compile(load(empty), "watch w\n  raise when @diary.thi > 72\n  notify office\n");
        assertTrue(typo.render().contains("unknown group '@diary'"), "a group no found site joins is still unknown: " + typo.render());
        CompileResult listedOnly = compile(load("site: hub\ncentral:\n  sites:\n    larkmoor: { zones: [calf-barn] }\n"
                + "notify:\n  office: { type: command, argv: [/bin/true] }\n"), rules);
        assertTrue(listedOnly.render().contains("unknown group '@dairy'") && listedOnly.render().contains("'*/cow-shed' matches no zone"),
                "without discovery the sites are all known: " + listedOnly.render());
    }
}
