package byre.daemon;

import byre.config.ByreConfig;
import byre.config.ZoneConfig;
import byre.rules.CompileResult;
import byre.rules.RuleCompiler;
import byre.rules.RuleSet;
import java.io.IOException;
import java.nio.file.Path;
import java.time.Duration;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Reads and compiles the configured rule files; logs every diagnostic. Each load also learns how often the
 * sensors report (from the history), which sets the max-age of zones without one and is logged when a sensor
 * reports too seldom for its zone's max-age.
 */
final class RuleLoader {
    private static final Logger LOG = LoggerFactory.getLogger(RuleLoader.class);

    private volatile ByreConfig config;
    private final java.time.Clock clock;
    private String fingerprint = "";
    private volatile ByreConfig effective;
    private volatile Map<String, Duration> intervals = Map.of();
    private List<String> loggedWarnings = List.of();

    RuleLoader(ByreConfig config, java.time.Clock clock) {
        this.config = config;
        this.clock = clock;
        this.effective = config;
    }

    /**
     * Compiles against {@code more} from the next {@link #load()} on: the configuration with sites a central byre has
     * found since (their zones and groups), which the caller then asks to be loaded.
     */
    void use(ByreConfig more) {
        config = more;
    }

    List<Path> paths() {
        return config.rulePaths();
    }

    /** True if a rule file was added, removed or changed since the last {@link #load()}. */
    boolean changed() {
        return !RuleFiles.fingerprint(paths()).equals(fingerprint);
    }

    /** The configuration with the max-ages of the last load (learnt ones filled in); safe to read on any thread. */
    ByreConfig effective() {
        return effective;
    }

    /** Each sensor's reporting interval as the last {@link #load()} learnt it from the history (empty before). */
    Map<String, Duration> intervals() {
        return intervals;
    }

    /** True while a zone without a max-age of its own still has the fixed default (nothing learnt yet). */
    boolean stillLearning() {
        for (ZoneConfig z : effective.zones().values()) {
            if (z.maxAgeLearnt() && z.maxAge().equals(ZoneConfig.UNLEARNT_MAX_AGE)) return true;
        }
        return false;
    }

    /**
     * True if the history now gives a zone that still has the fixed default a learnt max-age. Reads only those
     * zones' sensors: on the pipeline thread, hourly, it must stay cheap however busy the other sensors are.
     */
    boolean maxAgesChanged() {
        Map<String, ZoneConfig> unlearnt = new java.util.LinkedHashMap<>();
        for (ZoneConfig z : effective.zones().values()) {
            if (z.maxAgeLearnt() && z.maxAge().equals(ZoneConfig.UNLEARNT_MAX_AGE)) unlearnt.put(z.id(), z);
        }
        if (unlearnt.isEmpty()) return false;
        ByreConfig few = config.withZones(unlearnt);
        ByreConfig now = Freshness.resolve(few, ReportingIntervals.sensorsFromHistory(few, clock.instant()));
        for (ZoneConfig z : now.zones().values()) {
            if (!z.maxAge().equals(ZoneConfig.UNLEARNT_MAX_AGE)) return true;
        }
        return false;
    }

    /**
     * The compiled rules, or empty (with the problems logged) when a file is unreadable, too large or has errors.
     * Never throws: a reload must not be able to stop the daemon, whatever the files hold.
     */
    Optional<RuleSet> load() {
        fingerprint = RuleFiles.fingerprint(paths());
        Map<String, Duration> intervals = ReportingIntervals.sensorsFromHistory(config, clock.instant());
        this.intervals = intervals;
        ByreConfig learnt = Freshness.resolve(config, intervals);
        List<String> warnings = Freshness.warnings(learnt, intervals);
        if (!warnings.equals(loggedWarnings)) warnings.forEach(LOG::warn); // once, not at every reload
        loggedWarnings = warnings;
        CompileResult result;
        try {
            result = RuleCompiler.compile(RuleFiles.read(paths()),
                    new ConfigRuleContext(learnt, ReportingIntervals.byZone(config, intervals)));
        } catch (IOException e) {
            LOG.error("cannot read rule files: {}", e.getMessage());
            return Optional.empty();
        } catch (RuntimeException | StackOverflowError e) {
            // A fault of byre's, not of the files; the running rules stay, and the trace helps a fix.
            LOG.error("compiling the rule files failed: {}", e.toString(), e);
            return Optional.empty();
        }
        if (!result.diagnostics().isEmpty()) {
            String text = result.render();
            if (result.hasErrors()) {
                LOG.error("rule files have {} error(s):\n{}", result.errors().size(), text);
            } else {
                LOG.warn("rule files have {} warning(s):\n{}", result.warnings().size(), text);
            }
        }
        if (result.ruleSet().isPresent()) {
            if (effective != learnt) logMaxAges(learnt);
            effective = learnt;
        }
        return result.ruleSet();
    }

    private void logMaxAges(ByreConfig learnt) {
        for (ZoneConfig z : learnt.zones().values()) {
            ZoneConfig before = effective.zones().get(z.id());
            if (z.maxAgeLearnt() && !z.maxAge().equals(before.maxAge()) && !z.maxAge().equals(ZoneConfig.UNLEARNT_MAX_AGE)) {
                LOG.info("zone {}: max-age {} (learnt: 2.5 times how often its slowest sensor reports)", z.id(), Freshness.text(z.maxAge()));
            }
        }
    }
}
