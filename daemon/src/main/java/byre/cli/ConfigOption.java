package byre.cli;

import byre.config.ByreConfig;
import byre.config.ConfigException;
import byre.config.ConfigLoader;
import byre.config.ConfigProblem;
import byre.notify.ChannelTypes;
import java.io.PrintStream;
import java.nio.file.Path;
import picocli.CommandLine.Option;

/** {@code --config F}, else {@code $BYRE_CONFIG}, else /etc/byre/byre.yaml: shared by every verb that reads it. */
final class ConfigOption {
    static final Path DEFAULT = Path.of("/etc/byre/byre.yaml");

    @Option(names = "--config", paramLabel = "FILE", description = "Configuration file (default: $BYRE_CONFIG or /etc/byre/byre.yaml).")
    Path file;

    Path path() {
        Path p = explicitPath();
        return p != null ? p : DEFAULT;
    }

    /** The file named by {@code --config} or {@code $BYRE_CONFIG}, or null (for verbs where the configuration is optional). */
    Path explicitPath() {
        return file != null ? file : fromEnvironment();
    }

    /** {@code $BYRE_CONFIG}, or null. */
    static Path fromEnvironment() {
        String env = System.getenv("BYRE_CONFIG");
        return env != null && !env.isBlank() ? Path.of(env) : null;
    }

    /** Loads the configuration, or prints every problem and returns null. */
    ByreConfig load(PrintStream err) {
        try {
            return ConfigLoader.load(path(), ChannelTypes.ALL);
        } catch (ConfigException e) {
            for (ConfigProblem p : e.problems()) err.println(p);
            err.println("byre: the configuration has " + e.problems().size() + " problem" + (e.problems().size() == 1 ? "" : "s") + "; nothing was started.");
            return null;
        }
    }
}
