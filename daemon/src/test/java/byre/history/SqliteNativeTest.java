package byre.history;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.BufferedReader;
import java.io.InputStreamReader;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.concurrent.TimeUnit;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** SQLite's native library is copied once beside the history, not once per process into the temporary folder. */
class SqliteNativeTest {
    @TempDir
    Path dir;

    /** A process that opens a history and waits to be killed. */
    public static final class OpenAndWait {
        public static void main(String[] args) throws Exception {
            try (HistoryStore store = HistoryStore.open(Path.of(args[0]))) {
                System.out.println("READY " + System.getProperty("org.sqlite.lib.path"));
                System.out.flush();
                Thread.sleep(60_000);
            }
        }
    }

    List<String> names(Path folder) throws Exception {
        if (!Files.isDirectory(folder)) return List.of();
        try (Stream<Path> s = Files.list(folder)) {
            return s.map(p -> p.getFileName().toString()).sorted().toList();
        }
    }

    @Test
    void aKilledProcessLeavesNothingInTheTemporaryFolder() throws Exception {
        Path tmp = Files.createDirectories(dir.resolve("tmp"));
        Path db = dir.resolve("state/history.db");
        String java = Path.of(System.getProperty("java.home"), "bin", "java").toString();
        for (int run = 0; run < 3; run++) {
            Process p = new ProcessBuilder(java, "-Xmx64m", "-XX:TieredStopAtLevel=1", "-Djava.io.tmpdir=" + tmp,
                    "-cp", System.getProperty("java.class.path"), OpenAndWait.class.getName(), db.toString())
                    .redirectError(ProcessBuilder.Redirect.DISCARD).start();
            try {
                BufferedReader out = new BufferedReader(new InputStreamReader(p.getInputStream(), StandardCharsets.UTF_8));
                String line = out.readLine();
                assertEquals("READY " + db.getParent().resolve(SqliteNative.FOLDER), line);
            } finally {
                p.destroyForcibly(); // SIGKILL: no exit hooks run
                assertTrue(p.waitFor(30, TimeUnit.SECONDS));
            }
        }
        assertEquals(List.of(), names(tmp).stream().filter(n -> n.startsWith("sqlite-")).toList(), "copies in the temporary folder");
        List<String> kept = names(db.getParent().resolve(SqliteNative.FOLDER));
        assertEquals(1, kept.size(), kept.toString());
        assertTrue(kept.get(0).startsWith("libsqlitejdbc-") && kept.get(0).endsWith(".so"), kept.toString());
    }

    @Test
    void theCopyIsWrittenOnceAndReplacedWhenItDiffers() throws Exception {
        Path folder = dir.resolve(".native");
        byte[] lib = "not really a library".getBytes(StandardCharsets.UTF_8);
        assertTrue(SqliteNative.placed(folder, "lib.so", lib));
        Path file = folder.resolve("lib.so");
        assertArrayEquals(lib, Files.readAllBytes(file));
        long modified = Files.getLastModifiedTime(file).toMillis();
        Files.setLastModifiedTime(file, java.nio.file.attribute.FileTime.fromMillis(modified - 60_000));
        assertTrue(SqliteNative.placed(folder, "lib.so", lib));
        assertEquals(modified - 60_000, Files.getLastModifiedTime(file).toMillis(), "an identical copy is reused");
        Files.writeString(file, "damaged");
        assertTrue(SqliteNative.placed(folder, "lib.so", lib));
        assertArrayEquals(lib, Files.readAllBytes(file));
        assertEquals(List.of("lib.so"), names(folder), "no part file left");
        assertNotEquals(0, Files.size(file));
    }

    @Test
    void aFolderThatCannotBeWrittenIsReported() throws Exception {
        Path notAFolder = Files.writeString(dir.resolve("file"), "x");
        assertTrue(!SqliteNative.placed(notAFolder.resolve(".native"), "lib.so", new byte[] {1}));
    }
}
