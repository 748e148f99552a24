package byre.notify;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.alerts.AlertEvent;
import byre.alerts.AlertPolicy;
import byre.alerts.WatchOutcome;
import byre.config.ByreConfig;
import byre.config.ChannelFields;
import byre.config.ConfigException;
import byre.config.ConfigLoader;
import byre.history.HistoryStore;
import byre.testing.Configs;
import byre.testing.MutableClock;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.time.Duration;
import java.time.Instant;
import java.util.List;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * A fifth kind of channel, added the way a new one is added: one class with its kind beside it (here {@link
 * FileChannel}, nested only to keep the test in one file) and one line in the list of kinds ({@link #KINDS} here,
 * {@link ChannelTypes#ALL} in byre). Nothing else changes: the loader reads and checks it, the alerting builds it.
 */
class FifthChannelTest {
    /** Appends each event's text as one line to a file. */
    static final class FileChannel implements Channel {
        record Settings(Path path) {}

        static final ChannelKind<Settings> KIND = ChannelKind.of("file", List.of("path"), List.of("path"), FileChannel::read,
                (name, s, ctx) -> new FileChannel(name, s.path()));

        static Settings read(ChannelFields f) {
            Path p = f.path("path");
            if (p != null && !Files.isDirectory(p.toAbsolutePath().getParent())) {
                f.problem("path", f.channel() + ".path: the folder " + p.toAbsolutePath().getParent() + " does not exist");
            }
            return new Settings(p);
        }

        private final String name;
        private final Path path;

        FileChannel(String name, Path path) {
            this.name = name;
            this.path = path;
        }

        @Override
        public String name() {
            return name;
        }

        @Override
        public String type() {
            return "file";
        }

        @Override
        public DeliveryResult deliver(AlertEvent event) {
            try {
                Files.writeString(path, event.message() + "\n", StandardCharsets.UTF_8, StandardOpenOption.CREATE, StandardOpenOption.APPEND);
                return DeliveryResult.success("appended to " + path);
            } catch (IOException e) {
                return DeliveryResult.failure(FailureReason.IO, "cannot append to " + path + ": " + e.getMessage());
            }
        }
    }

    static final List<ChannelKind<?>> KINDS = Stream.concat(ChannelTypes.ALL.stream(), Stream.of(FileChannel.KIND)).toList();

    static final Instant T0 = Instant.parse("2026-01-14T05:10:00Z");

    @TempDir
    Path dir;

    ByreConfig parse(String notify) throws ConfigException {
        return ConfigLoader.parse("byre.yaml", "site: larkmoor\nhistory: { path: history.db }\nnotify:\n" + notify, dir, n -> null, KINDS);
    }

    List<String> problems(String notify) {
        return assertThrows(ConfigException.class, () -> parse(notify)).problems().stream().map(Object::toString).toList();
    }

    @Test
    void theFifthKindIsConfigured() throws Exception {
        ByreConfig c = parse("  barn-log: { type: file, path: alerts.txt, rate-limit: 3 }\n");
        assertEquals("file", c.channels().get("barn-log").type());
        assertEquals(dir.resolve("alerts.txt"), c.channels().get("barn-log").settings(FileChannel.Settings.class).path());
        assertEquals(3, c.channels().get("barn-log").rateLimit());
    }

    @Test
    void theFifthKindIsChecked() {
        assertEquals(List.of("byre.yaml:4:13: file channel barn-log is missing 'path'"), problems("  barn-log: { type: file }\n"));
        assertEquals(List.of("byre.yaml:4:27: unknown key 'pth' in file channel barn-log (did you mean 'path'?)",
                "byre.yaml:4:13: file channel barn-log is missing 'path'"), problems("  barn-log: { type: file, pth: alerts.txt }\n"));
        assertEquals(List.of("byre.yaml:4:33: barn-log.path: the folder " + dir.resolve("nowhere") + " does not exist"),
                problems("  barn-log: { type: file, path: nowhere/alerts.txt }\n"));
        assertEquals(List.of("byre.yaml:4:21: unknown channel type 'fil' (did you mean 'file'?); one of webhook, mqtt, email, command, file"),
                problems("  barn-log: { type: fil, path: alerts.txt }\n"));
        // byre's own kinds do not know it
        ConfigException e = assertThrows(ConfigException.class, () -> Configs.parse("byre.yaml",
                "site: larkmoor\nnotify:\n  barn-log: { type: file, path: alerts.txt }\n", dir, n -> null));
        assertTrue(e.problems().get(0).toString().endsWith("; one of webhook, mqtt, email, command"), e.problems().toString());
    }

    @Test
    void theFifthKindDeliversThroughTheOutbox() throws Exception {
        ByreConfig c = parse("  barn-log: { type: file, path: alerts.txt }\n");
        try (HistoryStore store = HistoryStore.open(c.history().path())) {
            AlertService s = AlertServices.create(c, store, null, new SimpleMeterRegistry(), new MutableClock(T0));
            s.accept(new WatchOutcome(WatchOutcome.Kind.RAISED, "calf-chill", "calf-pen-1", "critical", "wind-chill", 3.1, "degC", T0, T0,
                    "Cold wind in calf-pen-1", new AlertPolicy(List.of("barn-log"), Duration.ofMinutes(30), null, List.of())));
            s.runOnce();
            assertEquals(0, s.outbox().depth());
            List<String> lines = Files.readAllLines(dir.resolve("alerts.txt"));
            assertEquals(1, lines.size(), lines.toString());
            assertTrue(lines.get(0).contains("calf-pen-1"), lines.get(0));
            s.close();
        }
    }
}
