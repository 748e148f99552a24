package byre.config;

import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.Map;
import java.util.Set;
import org.snakeyaml.engine.v2.nodes.Node;

/** Reads and checks {@code history:}: the database file, how long each resolution is kept, how often readings are committed. */
final class HistorySection {
    static final Set<String> KEYS = NodeReader.ordered("path", "keep-raw", "keep-minute", "keep-hour", "commit-every");

    private HistorySection() {}

    static HistorySettings read(NodeReader r, Node node) {
        Map<String, Node> m = node == null ? Map.of() : r.mapping(node, KEYS, "history");
        Path path = r.resolve(r.string(m.get("path"), "history.path", "/var/lib/byre/history.db"));
        checkPath(r, m.get("path"), path);
        Duration raw = r.duration(m.get("keep-raw"), "history.keep-raw", Duration.ofDays(14));
        Duration minute = r.duration(m.get("keep-minute"), "history.keep-minute", Duration.ofDays(90));
        Duration hour = r.duration(m.get("keep-hour"), "history.keep-hour", Duration.ofDays(5 * 365 + 1));
        if (raw.compareTo(minute) > 0) r.problem(m.get("keep-raw"), "history.keep-raw must not be longer than keep-minute");
        if (minute.compareTo(hour) > 0) r.problem(m.get("keep-minute"), "history.keep-minute must not be longer than keep-hour");
        Duration commitEvery = r.duration(m.get("commit-every"), "history.commit-every", HistorySettings.DEFAULT_COMMIT_EVERY);
        if (commitEvery.compareTo(Duration.ofMinutes(1)) > 0) {
            r.problem(m.get("commit-every"), "history.commit-every must be at most 1m: readings not yet committed are held only by the broker,"
                + " whose in-flight window and queue must hold that many");
        }
        return new HistorySettings(path, raw, minute, hour, commitEvery);
    }

    /**
     * SQLite keeps its journal and write-ahead log beside the database ({@code history.db-wal}): the path must be
     * a regular file or not yet exist, in a folder that exists or can be made ({@code /dev/null} would make
     * SQLite create {@code /dev/null-journal}).
     */
    private static void checkPath(NodeReader r, Node node, Path path) {
        if (Files.isDirectory(path)) {
            r.problem(node, "history.path " + path + " is a folder; give a file in it, such as " + path.resolve("history.db"));
        } else if (Files.exists(path) && !Files.isRegularFile(path)) {
            r.problem(node, "history.path " + path + " is not a regular file (a device, FIFO or socket); give a database file such as /var/lib/byre/history.db");
        } else {
            for (Path dir = path.toAbsolutePath().getParent(); dir != null; dir = dir.getParent()) {
                if (!Files.exists(dir)) continue; // created at start
                if (!Files.isDirectory(dir)) r.problem(node, "history.path " + path + ": " + dir + " is not a folder");
                break;
            }
        }
    }
}
