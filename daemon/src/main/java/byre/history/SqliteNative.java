package byre.history;

import java.io.IOException;
import java.io.InputStream;
import java.nio.file.AtomicMoveNotSupportedException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.util.Arrays;
import java.util.Comparator;
import java.util.stream.Stream;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;
import org.sqlite.SQLiteJDBCLoader;
import org.sqlite.util.LibraryLoaderUtil;

/**
 * Where SQLite's native library is loaded from. Left alone, sqlite-jdbc copies it into the temporary folder
 * under a new name on every start (1 MB each) and removes it only at a clean exit, so every killed process
 * left one behind. byre copies it once into {@code .native/} beside the history database and loads it from
 * there on every start; a process that cannot write there (an operator's {@code byre status}) and finds no
 * copy uses a private temporary folder that it removes at exit.
 */
public final class SqliteNative {
    private static final Logger LOG = LoggerFactory.getLogger(SqliteNative.class);
    static final String FOLDER = ".native";
    private static boolean prepared;

    private SqliteNative() {}

    /** Chooses the library's place before the first connection of this process; later calls do nothing. */
    public static synchronized void prepare(Path databaseFolder) {
        if (prepared) return;
        prepared = true;
        if (System.getProperty("org.sqlite.lib.path") != null || System.getProperty("org.sqlite.tmpdir") != null) return;
        String resource = LibraryLoaderUtil.getNativeLibResourcePath() + "/" + LibraryLoaderUtil.getNativeLibName();
        byte[] lib;
        try (InputStream in = SQLiteJDBCLoader.class.getResourceAsStream(resource)) {
            if (in == null) return; // no library for this platform in the jar: sqlite-jdbc says so itself
            lib = in.readAllBytes();
        } catch (IOException e) {
            return;
        }
        String name = "libsqlitejdbc-" + SQLiteJDBCLoader.getVersion() + ".so";
        if (databaseFolder != null) {
            Path dir = databaseFolder.resolve(FOLDER);
            if (placed(dir, name, lib)) {
                use(dir, name);
                return;
            }
        }
        try {
            Path dir = Files.createTempDirectory("byre-sqlite");
            Runtime.getRuntime().addShutdownHook(new Thread(() -> removeQuietly(dir), "byre-sqlite-cleanup"));
            if (placed(dir, name, lib)) use(dir, name);
        } catch (IOException | SecurityException e) {
            LOG.debug("no private folder for the SQLite library ({}); sqlite-jdbc places it", e.toString());
        }
    }

    /** True when {@code dir/name} holds exactly {@code lib}, writing it there if need be. */
    static boolean placed(Path dir, String name, byte[] lib) {
        Path file = dir.resolve(name);
        try {
            if (Files.isRegularFile(file) && Files.size(file) == lib.length && Arrays.equals(Files.readAllBytes(file), lib)) return true;
            Files.createDirectories(dir);
            Path tmp = Files.createTempFile(dir, name, ".part");
            try {
                Files.write(tmp, lib);
                try {
                    // readable by the operators' commands (a temporary file starts as owner-only)
                    Files.setPosixFilePermissions(tmp, java.nio.file.attribute.PosixFilePermissions.fromString("rw-r--r--"));
                } catch (UnsupportedOperationException ignored) {
                    // not a POSIX file system
                }
                try {
                    Files.move(tmp, file, StandardCopyOption.REPLACE_EXISTING, StandardCopyOption.ATOMIC_MOVE);
                } catch (AtomicMoveNotSupportedException e) {
                    Files.move(tmp, file, StandardCopyOption.REPLACE_EXISTING);
                }
            } finally {
                Files.deleteIfExists(tmp);
            }
            return true;
        } catch (IOException | SecurityException e) {
            return false;
        }
    }

    private static void use(Path dir, String name) {
        System.setProperty("org.sqlite.lib.path", dir.toAbsolutePath().toString());
        System.setProperty("org.sqlite.lib.name", name);
    }

    private static void removeQuietly(Path dir) {
        try (Stream<Path> walk = Files.walk(dir)) {
            walk.sorted(Comparator.reverseOrder()).forEach(p -> p.toFile().delete());
        } catch (IOException ignored) {
            // nothing more to do at exit
        }
    }
}
