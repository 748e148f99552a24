package byre.rules;

import java.time.Duration;
import java.util.List;
import java.util.Map;
import java.util.Optional;

/** The checked watches of all rule files, plus what the engine needs from the configuration. */
public final class RuleSet {
    private final List<Watch> watches;
    private final String site;
    private final Map<String, Duration> maxAge;
    private final Duration defaultMaxAge;

    RuleSet(List<Watch> watches, String site, Map<String, Duration> maxAge, Duration defaultMaxAge) {
        this.watches = List.copyOf(watches);
        this.site = site;
        this.maxAge = Map.copyOf(maxAge);
        this.defaultMaxAge = defaultMaxAge;
    }

    public List<Watch> watches() { return watches; }

    public Optional<Watch> watch(String name) {
        return watches.stream().filter(w -> w.name().equals(name)).findFirst();
    }

    public String site() { return site; }

    /** Freshness limit of a zone's streams. */
    public Duration maxAge(String zone) { return maxAge.getOrDefault(zone, defaultMaxAge); }
}
