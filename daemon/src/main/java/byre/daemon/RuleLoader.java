package byre.daemon;

import byre.config.ByreConfig;
import byre.rules.CompileResult;
import byre.rules.RuleCompiler;
import byre.rules.RuleSet;
import java.io.IOException;
import java.nio.file.Path;
import java.util.List;
import java.util.Optional;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/** Reads and compiles the configured rule files; logs every diagnostic. */
final class RuleLoader {
    private static final Logger LOG = LoggerFactory.getLogger(RuleLoader.class);

    private final ByreConfig config;
    private final java.time.Clock clock;
    private String fingerprint = "";

    RuleLoader(ByreConfig config, java.time.Clock clock) {
        this.config = config;
        this.clock = clock;
    }

    List<Path> paths() {
        return config.rulePaths();
    }

    /** True if a rule file was added, removed or changed since the last {@link #load()}. */
    boolean changed() {
        return !RuleFiles.fingerprint(paths()).equals(fingerprint);
    }

    /**
     * The compiled rules, or empty (with the problems logged) when a file is unreadable, too large or has errors.
     * Never throws: a reload must not be able to stop the daemon, whatever the files hold.
     */
    Optional<RuleSet> load() {
        fingerprint = RuleFiles.fingerprint(paths());
        CompileResult result;
        try {
            result = RuleCompiler.compile(RuleFiles.read(paths()),
                    new ConfigRuleContext(config, ReportingIntervals.fromHistory(config, clock.instant())));
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
        return result.ruleSet();
    }
}
