package byre.ops;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.jar.JarFile;
import org.junit.jupiter.api.Test;

/** The runnable jar carries SQLite's native library only for the Linux computers a barn runs. */
class JarNativesIT {
    @Test
    void onlyLinuxArmAarch64AndX8664() throws Exception {
        Path jar = Path.of(System.getProperty("byre.jar", "target/byre.jar"));
        assumeTrue(Files.isRegularFile(jar), "no jar at " + jar);
        try (JarFile j = new JarFile(jar.toFile())) {
            List<String> natives = j.stream().map(e -> e.getName())
                    .filter(n -> n.startsWith("org/sqlite/native/") && !n.endsWith("/")).sorted().toList();
            assertEquals(List.of("org/sqlite/native/Linux/aarch64/libsqlitejdbc.so", "org/sqlite/native/Linux/arm/libsqlitejdbc.so",
                    "org/sqlite/native/Linux/armv6/libsqlitejdbc.so", "org/sqlite/native/Linux/armv7/libsqlitejdbc.so",
                    "org/sqlite/native/Linux/x86_64/libsqlitejdbc.so"), natives);
        }
    }
}
