package byre.config;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.testing.Configs;
import java.io.RandomAccessFile;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.Timeout;
import org.junit.jupiter.api.io.TempDir;

/**
 * Files the configuration names are read only when they are regular files, and never beyond a cap: a FIFO
 * used to hang {@code check}, /dev/zero ran it out of memory. The timeouts are a guard against a hang
 * on the old code, not a measurement.
 */
class FileLimitsTest {
    @TempDir
    Path dir;

    static final String BASE = """
            site: larkmoor
            sensors:
              shed-dry: { topic: larkmoor/shed/dry, quantity: dry-bulb }
            """;

    ByreConfig parse(String text) throws ConfigException {
        return Configs.parse("byre.yaml", text, dir, name -> null);
    }

    List<String> problems(String text) {
        ConfigException e = assertThrows(ConfigException.class, () -> parse(text));
        return e.problems().stream().map(ConfigProblem::toString).toList();
    }

    static Path fifo(Path p) throws Exception {
        Process mk = new ProcessBuilder("mkfifo", p.toString()).inheritIO().start();
        assertTrue(mk.waitFor(10, TimeUnit.SECONDS) && mk.exitValue() == 0, "mkfifo");
        return p;
    }

    static Path sparse(Path p, long bytes) throws Exception {
        try (RandomAccessFile f = new RandomAccessFile(p.toFile(), "rw")) {
            f.setLength(bytes);
        }
        return p;
    }

    @Test
    @Timeout(value = 60, unit = TimeUnit.SECONDS)
    void aFifoAsPasswordFileIsRefusedNotWaitedOn() throws Exception {
        fifo(dir.resolve("mqtt.secret"));
        assertEquals(List.of("byre.yaml:3:18: mqtt.password-file: " + dir.resolve("mqtt.secret")
                        + " is not a regular file (a FIFO, socket or device); byre reads only regular files here"),
                problems("site: larkmoor\nmqtt:\n  password-file: mqtt.secret\n"));
    }

    @Test
    @Timeout(value = 60, unit = TimeUnit.SECONDS)
    void devZeroAsTokenFileTurnsAcknowledgingOffInsteadOfFillingTheHeap() throws Exception {
        ByreConfig c = parse(BASE + "admin:\n  token-file: /dev/zero\n");
        assertNull(c.admin().token());
        assertEquals("admin.token-file: /dev/zero is not a regular file (a FIFO, socket or device); byre reads only regular files here",
                c.admin().tokenProblem());
    }

    @Test
    void aHugeSecretFileIsRefusedBeforeItIsRead() throws Exception {
        sparse(dir.resolve("hook.secret"), 50L * 1024 * 1024);
        List<String> p = problems(BASE + "notify:\n  night-phone: { type: webhook, url: \"https://push.example/hook\", secret-file: hook.secret }\n");
        assertEquals(List.of("byre.yaml:5:80: night-phone.secret-file: " + dir.resolve("hook.secret")
                + " has 50.0 MiB, more than the 64 KiB byre reads from such a file"), p);
    }

    @Test
    void aLinkToASecretIsFineAndABrokenLinkIsNamed() throws Exception {
        Files.writeString(dir.resolve("real.secret"), "larkmoor-pass\n");
        Files.createSymbolicLink(dir.resolve("mqtt.secret"), dir.resolve("real.secret"));
        ByreConfig c = parse(BASE + "mqtt:\n  password-file: mqtt.secret\n");
        assertEquals("larkmoor-pass", c.mqtt().password().reveal());
        Files.createSymbolicLink(dir.resolve("gone.secret"), dir.resolve("nowhere.secret"));
        assertEquals(List.of("byre.yaml:5:18: mqtt.password-file: " + dir.resolve("gone.secret") + " is a broken link (its target "
                + dir.resolve("nowhere.secret") + " does not exist)"), problems(BASE + "mqtt:\n  password-file: gone.secret\n"));
    }

    @Test
    void aMissingTokenFileIsAProblemTheCheckCanReport() throws Exception {
        ByreConfig c = parse(BASE + "admin:\n  token-file: admin.token\n");
        assertEquals("admin.token-file: cannot read " + dir.resolve("admin.token") + " (no such file)", c.admin().tokenProblem());
    }

    @Test
    void historyPathMustBeAFileNotADeviceOrFolder() {
        assertEquals(List.of("byre.yaml:5:9: history.path /dev/null is not a regular file (a device, FIFO or socket); give a database file such as /var/lib/byre/history.db"),
                problems(BASE + "history:\n  path: /dev/null\n"));
        assertEquals(List.of("byre.yaml:5:9: history.path " + dir + " is a folder; give a file in it, such as " + dir.resolve("history.db")),
                problems(BASE + "history:\n  path: " + dir + "\n"));
    }

    @Test
    void historyPathUnderAFileIsRefusedAndANewFolderIsFine() throws Exception {
        Files.writeString(dir.resolve("notes.txt"), "x");
        assertEquals(List.of("byre.yaml:5:9: history.path " + dir.resolve("notes.txt/history.db") + ": " + dir.resolve("notes.txt") + " is not a folder"),
                problems(BASE + "history:\n  path: notes.txt/history.db\n"));
        assertEquals(dir.resolve("new/sub/history.db"), parse(BASE + "history:\n  path: new/sub/history.db\n").history().path());
    }

    @Test
    @Timeout(value = 60, unit = TimeUnit.SECONDS)
    void theConfigurationItselfIsReadWithTheSameCare() throws Exception {
        ConfigException e = assertThrows(ConfigException.class, () -> Configs.load(fifo(dir.resolve("byre.yaml"))));
        assertTrue(e.problems().get(0).toString().contains("is not a regular file"), e.problems().toString());
        e = assertThrows(ConfigException.class, () -> Configs.load(sparse(dir.resolve("big.yaml"), 200L * 1024 * 1024)));
        assertTrue(e.problems().get(0).toString().contains("has 200.0 MiB, more than the 1.0 MiB"), e.problems().toString());
    }

    @Test
    void maxIdsIsForWildcardFamiliesWithinLimits() throws Exception {
        ByreConfig c = parse("site: larkmoor\nsensors:\n  hutch-dry: { topic: larkmoor/hutches/+/dry, quantity: dry-bulb, id-level: 3, max-ids: 40 }\n"
                + "  shed-dry: { topic: larkmoor/shed/dry, quantity: dry-bulb }\n");
        assertEquals(40, c.sensors().get("hutch-dry").maxIds());
        assertEquals(SensorConfig.DEFAULT_MAX_IDS, c.sensors().get("shed-dry").maxIds());
        assertEquals(List.of("byre.yaml:4:14: max-ids applies only to a topic with wildcards (a family of sensors)"),
                problems(BASE.replace("dry-bulb }", "dry-bulb,\n    max-ids: 5 }")));
        assertEquals(List.of("byre.yaml:3:89: max-ids must be 1..10000, not 0"),
                problems("site: larkmoor\nsensors:\n  hutch-dry: { topic: larkmoor/hutches/+/dry, quantity: dry-bulb, id-level: 3, max-ids: 0 }\n"));
    }

    @Test
    void refusalsSayWhatTheFileIs() throws Exception {
        SmallFile.Refused r = assertThrows(SmallFile.Refused.class, () -> SmallFile.read(dir, 10));
        assertTrue(r.getMessage().endsWith("is a folder; byre reads only regular files here"), r.getMessage());
        Files.createSymbolicLink(dir.resolve("a"), dir.resolve("b"));
        Files.createSymbolicLink(dir.resolve("b"), dir.resolve("a"));
        r = assertThrows(SmallFile.Refused.class, () -> SmallFile.read(dir.resolve("a"), 10));
        assertTrue(r.getMessage().contains("a link that cannot be followed"), r.getMessage());
        assertNotNull(SmallFile.read(Files.writeString(dir.resolve("ok"), "12345"), 5));
        assertThrows(SmallFile.Refused.class, () -> SmallFile.read(dir.resolve("ok"), 4));
    }
}
