package byre.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.climate.ClimateInputs;
import byre.climate.Derivable;
import byre.climate.DerivedClimate;
import byre.climate.ThiVariant;
import byre.climate.ZoneClimate;
import byre.config.ByreConfig;
import byre.config.ZoneConfig;
import byre.ingest.Reading;
import byre.rules.CompileResult;
import byre.rules.Diagnostic;
import byre.rules.RuleCompiler;
import byre.rules.RuleSource;
import byre.testing.Configs;
import byre.units.Quantity;
import byre.zones.ClimateDeriver;
import byre.zones.ZoneStage;
import java.nio.file.Path;
import java.time.Instant;
import java.util.ArrayList;
import java.util.EnumMap;
import java.util.EnumSet;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import org.junit.jupiter.api.Test;

/**
 * For every combination of measured quantities and every THI form: the streams a watch may name
 * ({@code byre check}, reloads) are exactly the streams the zone derivation really gives from
 * readings of those quantities, and a refused stream is explained by a sensor the zone lacks.
 */
class StreamsAgreeTest {
    static final Instant T0 = Instant.parse("2026-07-14T13:00:00Z");
    static final List<Quantity> MEASURED = List.of(Quantity.DRY_BULB, Quantity.WET_BULB, Quantity.RH, Quantity.DEW_POINT,
            Quantity.AIR_SPEED, Quantity.SOLAR, Quantity.GLOBE, Quantity.PRESSURE);
    /** One plausible summer afternoon in a Larkmoor cow shed, consistent enough that no input is refused. */
    static final Map<Quantity, Double> VALUE = new EnumMap<>(Map.of(Quantity.DRY_BULB, 28.0, Quantity.WET_BULB, 22.0,
            Quantity.RH, 60.0, Quantity.DEW_POINT, 18.0, Quantity.AIR_SPEED, 1.5, Quantity.SOLAR, 300.0,
            Quantity.GLOBE, 32.0, Quantity.PRESSURE, 99.0));

    @Test
    void theDesignsMeasuredQuantitiesAreTheTablesInputs() {
        assertEquals(EnumSet.copyOf(MEASURED), Derivable.MEASURED);
    }

    @Test
    void whatCheckAllowsIsWhatTheDerivationProduces() throws Exception {
        int combinations = 1 << MEASURED.size();
        ByreConfig loaded = config(combinations);
        for (ThiVariant variant : ThiVariant.values()) {
            ByreConfig config = withThi(loaded, variant);
            ConfigRuleContext ctx = new ConfigRuleContext(config);
            Map<String, Set<Quantity>> produced = derive(config);
            for (int mask = 1; mask < combinations; mask++) {
                String zone = "z" + mask;
                Set<Quantity> measured = measured(mask);
                Set<Quantity> allowed = allowedByCheck(ctx, zone);
                String what = zone + " " + measured + " thi " + variant;
                assertEquals(produced.get(zone), allowed, what + ": check allows what the derivation never gives, or refuses what it gives");
                assertEquals(allowed, ctx.quantities(zone), what);
                for (Quantity q : Quantity.values()) {
                    if (allowed.contains(q)) {
                        assertTrue(ctx.whyNoStream(zone, q).isEmpty(), what + " " + q);
                        continue;
                    }
                    String why = ctx.whyNoStream(zone, q).orElseThrow(() -> new AssertionError(what + ": no reason for " + q));
                    assertTrue(why.startsWith(zone + " has no "), why);
                    // The sensors it says are missing are indeed missing.
                    String lacking = why.substring((zone + " has ").length(), why.contains(";") ? why.indexOf(';') : why.length());
                    for (Quantity m : measured) assertFalse(lacking.matches(".*\\b" + m.id() + "\\b.*"), what + ": " + why);
                }
            }
        }
    }

    @Test
    void calcNamesWhatIsMissingFromTheSameTable() {
        for (ThiVariant variant : ThiVariant.values()) {
            for (int mask = 1; mask < 1 << MEASURED.size(); mask++) {
                Set<Quantity> measured = measured(mask);
                ClimateInputs.Builder b = ClimateInputs.builder().thiVariant(variant);
                for (Quantity m : measured) set(b, m, VALUE.get(m));
                DerivedClimate d = ZoneClimate.derive(b.build());
                Set<Quantity> streams = Derivable.streams(measured, variant);
                for (Quantity q : Quantity.values()) {
                    if (q == Quantity.PRESSURE) continue; // always has a value: barometer, elevation or sea level
                    String what = measured + " thi " + variant + " " + q;
                    assertEquals(streams.contains(q), d.has(q), what);
                    assertEquals(streams.contains(q), d.missingInputs(q).isEmpty(), what + " " + d.missingInputs(q));
                }
            }
        }
    }

    static Set<Quantity> measured(int mask) {
        Set<Quantity> s = EnumSet.noneOf(Quantity.class);
        for (int i = 0; i < MEASURED.size(); i++) if ((mask & (1 << i)) != 0) s.add(MEASURED.get(i));
        return s;
    }

    /** One zone per combination, each with its own sensors. */
    static ByreConfig config(int combinations) throws Exception {
        StringBuilder sensors = new StringBuilder("sensors:\n");
        StringBuilder zones = new StringBuilder("zones:\n");
        for (int mask = 1; mask < combinations; mask++) {
            List<String> ids = new ArrayList<>();
            for (Quantity q : measured(mask)) {
                String id = "z" + mask + "-" + q.id();
                ids.add(id);
                sensors.append("  ").append(id).append(": { topic: larkmoor/z").append(mask).append('/').append(q.id())
                        .append(", quantity: ").append(q.id()).append(" }\n");
            }
            zones.append("  z").append(mask).append(": { sensors: [").append(String.join(", ", ids)).append("] }\n");
        }
        String text = "site: larkmoor\n" + sensors + zones + "notify:\n  office: { type: command, argv: [/bin/true] }\n";
        return Configs.parse("byre.yaml", text, Path.of("."), k -> null);
    }

    /** The same site with every zone computing THI by {@code variant} (as {@code thi:} in each zone would). */
    static ByreConfig withThi(ByreConfig c, ThiVariant variant) {
        Map<String, ZoneConfig> zones = new java.util.LinkedHashMap<>();
        for (ZoneConfig z : c.zones().values()) {
            zones.put(z.id(), new ZoneConfig(z.id(), z.groups(), z.sensors(), z.elevationM(), z.psychrometer(), z.maxAge(), variant.id(), z.line()));
        }
        return new ByreConfig(c.file(), c.site(), c.timezone(), c.units(), c.mqtt(), c.sensors(), zones, c.channels(), c.rulePaths(),
                c.history(), c.admin(), c.alerts(), c.page());
    }

    /** Feeds one reading of each sensor through the zone stage and its published derivation; what comes out per zone. */
    static Map<String, Set<Quantity>> derive(ByreConfig config) {
        List<ZoneConfig> zones = List.copyOf(config.zones().values());
        ZoneStage stage = new ZoneStage(zones, new ClimateDeriver(), new ZoneStage.Observer() {
            @Override public void wetBulbAboveDryBulb(String zone, double excessC) { throw new AssertionError(zone); }
            @Override public void derivationSkipped(String zone, String why) { throw new AssertionError(zone + ": " + why); }
            @Override public void derived(String zone) {}
        });
        Map<String, Set<Quantity>> out = new HashMap<>();
        Instant at = T0;
        for (ZoneConfig z : zones) {
            out.put(z.id(), EnumSet.noneOf(Quantity.class));
            for (String sensor : z.sensors()) {
                Quantity q = config.sensors().get(sensor).quantity();
                at = at.plusSeconds(2); // past the derivation pacing, so each reading derives at once
                stage.accept(new Reading(sensor, q, VALUE.get(q), at), r -> out.get(r.zone()).add(r.quantity()));
            }
        }
        return out;
    }

    /** The quantities a watch on {@code zone} may name: one watch per quantity, those without an error. */
    static Set<Quantity> allowedByCheck(ConfigRuleContext ctx, String zone) {
        StringBuilder rules = new StringBuilder();
        for (Quantity q : Quantity.values()) {
            rules.append("watch w-").append(q.id()).append("\n  raise when ").append(zone).append('.').append(q.id())
                    .append(" > 0 ").append(q.canonicalUnit().symbol()).append("\n  notify office\n");
        }
        CompileResult r = RuleCompiler.compile(List.of(new RuleSource("all.rules", rules.toString())), ctx);
        Set<Quantity> allowed = EnumSet.allOf(Quantity.class);
        for (Diagnostic d : r.errors()) allowed.remove(Quantity.values()[(d.line() - 2) / 3]);
        return allowed;
    }

    static void set(ClimateInputs.Builder b, Quantity q, double v) {
        switch (q) {
            case DRY_BULB -> b.dryBulbC(v);
            case WET_BULB -> b.wetBulbC(v);
            case RH -> b.rhPercent(v);
            case DEW_POINT -> b.dewPointC(v);
            case AIR_SPEED -> b.airSpeedMps(v);
            case SOLAR -> b.solarWm2(v);
            case GLOBE -> b.globeC(v);
            case PRESSURE -> b.pressureKPa(v);
            case HUMIDITY_RATIO, ENTHALPY, VPD, THI, HEAT_INDEX, WIND_CHILL, CCI, BGHI -> throw new AssertionError(q + " is not measured");
        }
    }
}
