package byre.rules;

import byre.units.Quantity;
import java.time.Duration;
import java.util.EnumSet;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.LinkedHashSet;
import java.util.Map;
import java.util.Optional;
import java.util.Set;

/** A {@link RuleContext} built by hand: for {@code replay} without a configuration, and for tests. */
public final class SimpleRuleContext implements RuleContext {
    private final Set<String> zones = new LinkedHashSet<>();
    private final Map<String, Set<String>> groups = new LinkedHashMap<>();
    private final Set<String> channels = new LinkedHashSet<>();
    private final Map<String, Duration> maxAge = new HashMap<>();
    private final Map<String, Duration> interval = new HashMap<>();
    private final Map<String, Set<Quantity>> quantities = new HashMap<>();
    private Duration defaultMaxAge = Duration.ofMinutes(5);
    private String site = "";
    private final Set<String> growing = new LinkedHashSet<>();

    public SimpleRuleContext zone(String zone, String... groupNames) {
        zones.add(zone);
        for (String g : groupNames) groups.computeIfAbsent(g, k -> new LinkedHashSet<>()).add(zone);
        return this;
    }

    public SimpleRuleContext channel(String... names) {
        channels.addAll(Set.of(names));
        return this;
    }

    public SimpleRuleContext maxAge(String zone, Duration d) { maxAge.put(zone, d); return this; }

    public SimpleRuleContext defaultMaxAge(Duration d) { defaultMaxAge = d; return this; }

    public SimpleRuleContext interval(String zone, Quantity q, Duration d) { interval.put(zone + "/" + q.id(), d); return this; }

    /** Restricts a zone to the given streams (default: every quantity). */
    public SimpleRuleContext quantities(String zone, Quantity... qs) {
        Set<Quantity> set = EnumSet.noneOf(Quantity.class);
        set.addAll(Set.of(qs));
        quantities.put(zone, set);
        return this;
    }

    public SimpleRuleContext site(String s) { site = s; return this; }

    /** Groups that may gain zones later (see {@link RuleContext#growingGroups()}). */
    public SimpleRuleContext growing(String... groupNames) { growing.addAll(Set.of(groupNames)); return this; }

    @Override public Set<String> zones() { return zones; }
    @Override public Map<String, Set<String>> groups() { return groups; }
    @Override public Set<String> channels() { return channels; }
    @Override public Optional<Duration> reportingInterval(String zone, Quantity q) { return Optional.ofNullable(interval.get(zone + "/" + q.id())); }
    @Override public Duration maxAge(String zone) { return maxAge.getOrDefault(zone, defaultMaxAge); }
    @Override public Set<Quantity> quantities(String zone) { return quantities.getOrDefault(zone, EnumSet.allOf(Quantity.class)); }
    @Override public String site() { return site; }
    @Override public Set<String> growingGroups() { return growing; }
}
