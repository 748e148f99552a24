package byre.daemon;

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
            streams.put(z.id(), streamsOf(z, config));
        }
    }

    /** The measured quantities of a zone's sensors plus every quantity derivable from them. */
    static Set<Quantity> streamsOf(ZoneConfig z, ByreConfig config) {
        Set<Quantity> q = EnumSet.noneOf(Quantity.class);
        for (String s : z.sensors()) {
            SensorConfig sc = config.sensors().get(s);
            if (sc == null) {
                int slash = s.indexOf('/');
                sc = slash > 0 ? config.sensors().get(s.substring(0, slash)) : null;
            }
            if (sc != null) q.add(sc.quantity());
        }
        boolean t = q.contains(Quantity.DRY_BULB);
        boolean h = q.contains(Quantity.RH) || q.contains(Quantity.WET_BULB) || q.contains(Quantity.DEW_POINT);
        boolean w = q.contains(Quantity.AIR_SPEED);
        if (t && h) {
            q.addAll(EnumSet.of(Quantity.RH, Quantity.DEW_POINT, Quantity.WET_BULB, Quantity.HUMIDITY_RATIO,
                    Quantity.ENTHALPY, Quantity.VPD, Quantity.THI, Quantity.HEAT_INDEX, Quantity.CCI));
        }
        if (t && w) q.add(Quantity.WIND_CHILL);
        if (q.contains(Quantity.GLOBE) && h) q.add(Quantity.BGHI);
        return q;
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
        return z == null ? Duration.ofMinutes(5) : z.maxAge();
    }

    @Override
    public Set<Quantity> quantities(String zone) {
        return streams.getOrDefault(zone, Set.of());
    }

    @Override
    public String site() {
        return config.site();
    }
}
