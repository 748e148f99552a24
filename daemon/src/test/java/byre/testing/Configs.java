package byre.testing;

import byre.config.ByreConfig;
import byre.config.ConfigException;
import byre.config.ConfigLoader;
import byre.notify.ChannelTypes;
import java.nio.file.Path;
import java.util.function.Function;

/** {@link ConfigLoader} with byre's own channel kinds, as the command line passes them. */
public final class Configs {
    private Configs() {}

    public static ByreConfig load(Path file) throws ConfigException {
        return ConfigLoader.load(file, ChannelTypes.ALL);
    }

    public static ByreConfig parse(String fileName, String text, Path baseDir, Function<String, String> environment)
            throws ConfigException {
        return ConfigLoader.parse(fileName, text, baseDir, environment, ChannelTypes.ALL);
    }
}
