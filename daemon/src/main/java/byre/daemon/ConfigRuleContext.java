package byre.daemon;

import byre.climate.Derivable;
import byre.climate.ThiVariant;
import byre.config.ByreConfig;
import byre.config.SensorConfig;
import byre.config.ZoneConfig;
import byre.rules.RuleContext;
import byre.units.Quantity;
import java.time.Duration;
import java.util.EnumSet;
import java.util.LinkedHashMap;
import java.util.LinkedHashSet;
import java.util.Map;
import java.util.Set;

/** What rule files are checked against, taken from the configuration: zones, groups, channels, streams. */
public final class ConfigRuleContext implements RuleContext {
    private final ByreConfig config;
    private final Map<String, Set<String>> groups = new LinkedHashMap<>();
    private final Map<String, Set<Quantity>> measured = new LinkedHashMap<>();
    /** Measured and derivable streams per zone, from the derivation's own recipe table. */
    private final Map<String, Set<Quantity>> streams = new LinkedHashMap<>();

    private final Map<String, Map<Quantity, Duration>> intervals;

    public ConfigRuleContext(ByreConfig config) {
        this(config, Map.of());
    }

    /** With the streams' reporting intervals (zone, then quantity), e.g. from {@link ReportingIntervals}. */
    public ConfigRuleContext(ByreConfig config, Map<String, Map<Quantity, Duration>> intervals) {
        this.config = config;
        this.intervals = intervals;
        for (ZoneConfig z : config.zones().values()) {
            for (String g : z.groups()) groups.computeIfAbsent(g, k -> new LinkedHashSet<>()).add(z.id());
            Set<Quantity> m = measuredBy(z, config);
            measured.put(z.id(), m);
            // A central zone has the streams its site publishes, which the site's own configuration decides.
            streams.put(z.id(), config.central().isSiteZone(z.id()) || config.central().isMirroredZone(z.id()) ? m
                    : Derivable.streams(m, thiVariant(z)));
        }
    }

    /** The quantities a zone's sensors measure. */
    static Set<Quantity> measuredBy(ZoneConfig z, ByreConfig config) {
        Set<Quantity> q = EnumSet.noneOf(Quantity.class);
        for (String s : z.sensors()) {
            SensorConfig sc = config.sensors().get(s);
            if (sc == null) {
                int slash = s.indexOf('/');
                sc = slash > 0 ? config.sensors().get(s.substring(0, slash)) : null;
            }
            if (sc != null) q.add(sc.quantity());
        }
        return q;
    }

    /** The THI form a zone derives by, as the derivation reads it (unset: the default). */
    static ThiVariant thiVariant(ZoneConfig z) {
        ThiVariant v = ThiVariant.byId(z.thiVariant());
        return v == null ? ThiVariant.NRC_1971 : v;
    }

    @Override
    public Set<String> zones() {
        return config.zones().keySet();
    }

    @Override
    public Map<String, Set<String>> groups() {
        return groups;
    }

    @Override
    public Set<String> channels() {
        return config.channels().keySet();
    }

    @Override
    public java.util.Optional<Duration> reportingInterval(String zone, Quantity quantity) {
        return java.util.Optional.ofNullable(intervals.getOrDefault(zone, Map.of()).get(quantity));
    }

    @Override
    public Duration maxAge(String zone) {
        ZoneConfig z = config.zones().get(zone);
        return z == null ? ZoneConfig.UNLEARNT_MAX_AGE : z.maxAge();
    }

    @Override
    public Set<Quantity> quantities(String zone) {
        return streams.getOrDefault(zone, Set.of());
    }

    @Override
    public java.util.Optional<String> whyNoStream(String zone, Quantity quantity) {
        ZoneConfig z = config.zones().get(zone);
        if (config.central().isSiteZone(zone)) {
            return java.util.Optional.of(zone + " is a site's own zone: its one stream is 'online' (1 online, 0 offline)");
        }
        if (config.central().isMirroredZone(zone)) {
            return java.util.Optional.of(zone + " mirrors a site's zone, which never publishes '" + quantity.id() + "'");
        }
        return z == null ? java.util.Optional.empty() : Derivable.whyNot(zone, quantity, measured.get(zone), thiVariant(z));
    }

    /** A central byre that takes in the sites it finds: they join {@code sites} and the groups of {@code central.defaults}. */
    @Override
    public Set<String> growingGroups() {
        if (!config.central().discover()) return Set.of();
        Set<String> g = new LinkedHashSet<>(config.central().defaults().groups());
        g.add(byre.config.CentralSettings.SITES_GROUP);
        return g;
    }

    @Override
    public String site() {
        return config.site();
    }
}
