package byre.config;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.regex.Pattern;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;

/**
 * The configuration is read before the stages it configures exist: it is handed the channel kinds and has its own
 * address check, so nothing in it names the notify or MQTT packages (an import or a qualified name alike).
 */
class ConfigImportsTest {
    static final Pattern LATER_STAGE = Pattern.compile("\\bbyre\\.(notify|mqtt)\\.");

    @Test
    void theConfigurationNamesNeitherNotifyNorMqtt() throws Exception {
        Path dir = Path.of("src", "main", "java", "byre", "config");
        try (Stream<Path> files = Files.list(dir)) {
            List<Path> sources = files.filter(p -> p.toString().endsWith(".java")).toList();
            assertTrue(sources.size() > 10, "the configuration's sources are found: " + dir.toAbsolutePath());
            List<String> offending = sources.stream()
                    .filter(p -> LATER_STAGE.matcher(read(p)).find())
                    .map(p -> p.getFileName().toString()).sorted().toList();
            assertEquals(List.of(), offending);
        }
    }

    private static String read(Path p) {
        try {
            return Files.readString(p);
        } catch (java.io.IOException e) {
            throw new java.io.UncheckedIOException(e);
        }
    }
}
