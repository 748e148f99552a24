package byre.daemon;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.config.ByreConfig;
import byre.config.SmallFile;
import byre.mqtt.EmbeddedBroker;
import byre.rules.Watch;
import byre.testing.Configs;
import byre.zones.ClimateDeriver;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.io.IOException;
import java.io.RandomAccessFile;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.attribute.FileTime;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.List;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.Timeout;
import org.junit.jupiter.api.io.TempDir;

/**
 * Rule files are size-capped before they are read (a 50 MB file used to end the daemon with OutOfMemoryError
 * at every start), and a {@code *.rules} entry that cannot be read is an error instead of being skipped.
 */
class RuleFilesTest {
    @TempDir
    Path dir;

    static String watch(String name) {
        return "watch " + name + "\n  raise when cows.thi >= 72 for 30m\n  clear when cows.thi <= 70 for 20m\n  notify office\n";
    }

    static void sparse(Path p, long bytes) throws IOException {
        try (RandomAccessFile f = new RandomAccessFile(p.toFile(), "rw")) {
            f.setLength(bytes);
        }
    }

    static List<String> names(Daemon d) {
        return d.watches().engine().rules().watches().stream().map(Watch::name).toList();
    }

    Path rulesDir() throws IOException {
        Path rules = Files.createDirectories(dir.resolve("rules.d"));
        Files.writeString(rules.resolve("heat.rules"), watch("heat-stress"));
        return rules;
    }

    @Test
    void aFileOverTheCapIsRefusedWithItsSize() throws Exception {
        Path rules = rulesDir();
        sparse(rules.resolve("huge.rules"), 50L * 1024 * 1024);
        IOException e = assertThrows(IOException.class, () -> RuleFiles.read(List.of(rules)));
        assertEquals(rules.resolve("huge.rules") + " has 50.0 MiB, more than the 256 KiB a rule file may have; split it or remove what is not rules",
                e.getMessage());
    }

    @Test
    void theFilesTogetherHaveACapToo() throws Exception {
        Path rules = rulesDir();
        for (int i = 0; i < 5; i++) sparse(rules.resolve("part" + i + ".rules"), RuleFiles.FILE_MAX_BYTES);
        IOException e = assertThrows(IOException.class, () -> RuleFiles.read(List.of(rules)));
        assertTrue(e.getMessage().startsWith("the rule files have 1.3 MiB together, more than the 1.0 MiB byre reads"), e.getMessage());
        // just under both caps is read
        for (int i = 1; i < 5; i++) Files.delete(rules.resolve("part" + i + ".rules"));
        assertEquals(2, RuleFiles.read(List.of(rules)).size());
    }

    @Test
    void aBrokenLinkOrALoopInTheFolderIsAnError() throws Exception {
        Path rules = rulesDir();
        Files.createSymbolicLink(rules.resolve("cold.rules"), dir.resolve("moved-away.rules"));
        IOException e = assertThrows(IOException.class, () -> RuleFiles.list(List.of(rules)));
        assertEquals(rules.resolve("cold.rules") + " is a broken link (its target " + dir.resolve("moved-away.rules") + " does not exist)",
                e.getMessage());
        Files.delete(rules.resolve("cold.rules"));
        Files.createSymbolicLink(rules.resolve("a.rules"), rules.resolve("b.rules"));
        Files.createSymbolicLink(rules.resolve("b.rules"), rules.resolve("a.rules"));
        e = assertThrows(IOException.class, () -> RuleFiles.list(List.of(rules)));
        assertTrue(e.getMessage().startsWith(rules.resolve("a.rules") + " is a link that cannot be followed"), e.getMessage());
        assertTrue(RuleFiles.fingerprint(List.of(rules)).startsWith("unreadable:"), "a reload sees the change and refuses it");
    }

    @Test
    @Timeout(value = 60, unit = TimeUnit.SECONDS) // a guard: reading a FIFO would wait for a writer for ever
    void aFifoNamedLikeARuleFileIsAnError() throws Exception {
        Path rules = rulesDir();
        Process mk = new ProcessBuilder("mkfifo", rules.resolve("pipe.rules").toString()).inheritIO().start();
        assertTrue(mk.waitFor(10, TimeUnit.SECONDS) && mk.exitValue() == 0);
        IOException e = assertThrows(SmallFile.Refused.class, () -> RuleFiles.read(List.of(rules)));
        assertTrue(e.getMessage().contains("pipe.rules is not a regular file"), e.getMessage());
        e = assertThrows(SmallFile.Refused.class, () -> RuleFiles.read(List.of(rules.resolve("pipe.rules"))));
        assertTrue(e.getMessage().contains("pipe.rules is not a regular file"), e.getMessage());
    }

    @Test
    void aLinkToARuleFileIsRead() throws Exception {
        Path rules = rulesDir();
        Files.writeString(dir.resolve("shared-cold.rules"), watch("cold"));
        Files.createSymbolicLink(rules.resolve("cold.rules"), dir.resolve("shared-cold.rules"));
        assertEquals(2, RuleFiles.read(List.of(rules)).size());
    }

    @Test
    void aHugeFileAtReloadLeavesTheRunningRulesAndTheDaemonAlive() throws Exception {
        Path rules = rulesDir();
        String yaml = """
                site: larkmoor
                mqtt: { broker: embedded, listen: 127.0.0.1:%d, client-id: byre-rule-files-test }
                sensors:
                  shed-dry: { topic: t/dry, quantity: dry-bulb }
                  shed-rh: { topic: t/rh, quantity: rh }
                zones:
                  cows: { sensors: [shed-dry, shed-rh] }
                notify:
                  office: { type: command, argv: [/bin/true] }
                rules: rules.d
                history: { path: history.db }
                """.formatted(EmbeddedBroker.freePort("127.0.0.1"));
        ByreConfig cfg = Configs.parse("byre.yaml", yaml, dir, n -> null);
        ch.qos.logback.classic.Logger logger = (ch.qos.logback.classic.Logger) org.slf4j.LoggerFactory.getLogger(RuleLoader.class);
        ch.qos.logback.core.read.ListAppender<ch.qos.logback.classic.spi.ILoggingEvent> log = new ch.qos.logback.core.read.ListAppender<>();
        log.start();
        logger.addAppender(log);
        try (Daemon d = Daemon.create(cfg, Clock.systemUTC(), new SimpleMeterRegistry()).start(new ClimateDeriver())) {
            Path huge = rules.resolve("huge.rules");
            sparse(huge, 50L * 1024 * 1024);
            Files.setLastModifiedTime(huge, FileTime.from(Instant.now().plusSeconds(5)));
            d.reload();
            await().atMost(Duration.ofSeconds(10)).until(() -> List.copyOf(log.list).stream()
                    .anyMatch(e -> e.getFormattedMessage().contains("huge.rules has 50.0 MiB")));
            assertEquals(List.of("heat-stress"), names(d), "the running rules stay");

            Files.delete(huge);
            Files.writeString(rules.resolve("cold.rules"), watch("cold"));
            d.reload();
            await().atMost(Duration.ofSeconds(10)).until(() -> names(d).equals(List.of("cold", "heat-stress")));
        } finally {
            logger.detachAppender(log);
        }
    }
}
