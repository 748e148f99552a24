package byre.rules;

import byre.units.Quantity;
import java.time.Duration;
import java.util.EnumSet;
import java.util.Map;
import java.util.Optional;
import java.util.Set;

/**
 * What the checker resolves rule files against; the daemon implements it from its configuration,
 * {@link SimpleRuleContext} is a plain implementation for replay and tests.
 */
public interface RuleContext {
    /**
     * Freshness limit of a zone nobody said anything about: a sensor reporting every 5 minutes may miss one
     * report (the daemon learns a better one from how often the sensors report).
     */
    Duration DEFAULT_MAX_AGE = Duration.ofMinutes(11);

    /** Zone ids of the site. */
    Set<String> zones();

    /** Group name (without '@') to the zone ids in it. */
    Map<String, Set<String>> groups();

    /** Names of the configured notification channels. */
    Set<String> channels();

    /** How often a zone's stream is expected to report, if known (for the hold-time warning). */
    default Optional<Duration> reportingInterval(String zone, Quantity quantity) { return Optional.empty(); }

    /** A reading older than this is not fresh (one exactly this old still is); {@code silent()} turns true then. */
    default Duration maxAge(String zone) { return DEFAULT_MAX_AGE; }

    /** Streams the zone provides (measured or derivable). A glob or group skips zones without the stream. */
    default Set<Quantity> quantities(String zone) { return EnumSet.allOf(Quantity.class); }

    /**
     * Why a zone can never have a stream, naming the sensors it lacks ("cow-shed has no air-speed sensor;
     * cci needs ..."); empty when it can, or when this context cannot tell.
     */
    default Optional<String> whyNoStream(String zone, Quantity quantity) { return Optional.empty(); }

    /**
     * Groups that may gain zones while the daemon runs (on a central byre that takes in the sites it finds: the
     * group {@code sites} and the groups found sites join). A group of these with no zone yet, and a glob matching
     * none while there are any, is a warning, not an error: the watch makes its alerts once zones join.
     */
    default Set<String> growingGroups() { return Set.of(); }

    /** Short site id for the {site} placeholder. */
    default String site() { return ""; }
}
