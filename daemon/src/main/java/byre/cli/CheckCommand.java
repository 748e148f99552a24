package byre.cli;

import byre.config.ByreConfig;
import byre.daemon.ConfigRuleContext;
import byre.daemon.RuleFiles;
import byre.rules.CompileResult;
import byre.rules.RuleCompiler;
import byre.rules.RuleSource;
import java.io.IOException;
import java.nio.file.Path;
import java.util.List;
import java.util.concurrent.Callable;
import picocli.CommandLine.Command;
import picocli.CommandLine.Mixin;
import picocli.CommandLine.Parameters;

/** {@code byre check}: the configuration, then the rule files, every problem at once. */
@Command(name = "check", mixinStandardHelpOptions = true,
        description = {"Validate the configuration and rule files before they go live.",
                "Without FILES, checks the rule files the configuration names."})
final class CheckCommand implements Callable<Integer> {
    static final String SAFETY = "Note: alerts supplement, never replace, regular checks of the animals, their water and ventilation;"
            + " adapt every threshold with the herd's veterinarian and local codes of practice.";

    @Mixin
    ConfigOption config;

    @Parameters(paramLabel = "FILES", arity = "0..*", description = "Rule files or folders to check instead of the configured ones.")
    List<Path> files;

    @Override
    public Integer call() {
        ByreConfig cfg = config.load(System.err);
        if (cfg == null) return Main.USAGE;
        if (cfg.admin().tokenProblem() != null) {
            System.err.println("byre check: warning: " + cfg.admin().tokenProblem()
                    + "; the daemon starts, but acknowledging through the admin API is off until the token file can be read");
        }
        String ackWarning = cfg.mqtt().openAckWarning();
        if (ackWarning != null) System.err.println(config.path() + ": warning: " + ackWarning);
        List<Path> paths = files == null || files.isEmpty() ? cfg.rulePaths() : files;
        List<RuleSource> sources;
        try {
            sources = RuleFiles.read(paths);
        } catch (IOException e) {
            System.err.println("byre check: " + e.getMessage());
            return Main.USAGE;
        }
        // Hold times and max-ages are compared with how often the streams really report, where the history knows it;
        // zones without a max-age get the one the daemon would learn.
        java.util.Map<String, java.time.Duration> intervals = byre.daemon.ReportingIntervals.sensorsFromHistory(cfg, java.time.Instant.now());
        ByreConfig learnt = byre.daemon.Freshness.resolve(cfg, intervals);
        List<String> freshness = byre.daemon.Freshness.warnings(learnt, intervals);
        for (String w : freshness) System.err.println(config.path() + ": warning: " + w);
        if (!freshness.isEmpty()) System.err.println();
        CompileResult result = RuleCompiler.compile(sources,
                new ConfigRuleContext(learnt, byre.daemon.ReportingIntervals.byZone(cfg, intervals)));
        if (!result.diagnostics().isEmpty()) System.err.println(result.render() + "\n");
        int watches = result.ruleSet().map(rs -> rs.watches().size()).orElse(0);
        int warnings = result.warnings().size() + freshness.size();
        if (result.hasErrors()) {
            System.err.printf("byre check: %d error%s, %d warning%s in %d rule file%s; fix them before the rules go live (a running daemon keeps its old rules).%n",
                    result.errors().size(), plural(result.errors().size()), warnings, plural(warnings),
                    sources.size(), plural(sources.size()));
            return Main.USAGE;
        }
        System.out.printf("%s: configuration ok (%d sensors, %d zones, %d channels); %d rule file%s ok, %d watch%s, %d warning%s.%n",
                config.path(), cfg.sensors().size(), cfg.zones().size(), cfg.channels().size(), sources.size(), plural(sources.size()),
                watches, watches == 1 ? "" : "es", warnings, plural(warnings));
        if (watches > 0) System.out.println(SAFETY);
        return Main.OK;
    }

    private static String plural(int n) {
        return n == 1 ? "" : "s";
    }
}
