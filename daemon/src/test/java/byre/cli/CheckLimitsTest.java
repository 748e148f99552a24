package byre.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.RandomAccessFile;
import java.nio.file.Files;
import java.nio.file.Path;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** {@code byre check} names the files byre will not read: a missing token file, a rule file over its cap. */
class CheckLimitsTest {
    @TempDir
    Path dir;

    Path config(String extra) throws Exception {
        Files.createDirectories(dir.resolve("rules.d"));
        Files.writeString(dir.resolve("rules.d/heat.rules"),
                "watch heat\n  raise when cow-shed.thi >= 72 for 30m\n  clear when cow-shed.thi <= 70 for 20m\n  notify office\n");
        return Files.writeString(dir.resolve("byre.yaml"), CheckCommandTest.COW_SHED + extra);
    }

    @Test
    void aMissingTokenFileIsReported() throws Exception {
        CliRun r = CliRun.of("check", "--config", config("admin: { token-file: admin.token }\n").toString());
        assertEquals(Main.OK, r.code(), r.err());
        assertTrue(r.err().contains("warning: admin.token-file: cannot read " + dir.resolve("admin.token") + " (no such file)"), r.err());
    }

    @Test
    void aRuleFileOverTheCapFailsTheCheck() throws Exception {
        Path cfg = config("");
        try (RandomAccessFile f = new RandomAccessFile(dir.resolve("rules.d/huge.rules").toFile(), "rw")) {
            f.setLength(50L * 1024 * 1024);
        }
        CliRun r = CliRun.of("check", "--config", cfg.toString());
        assertEquals(Main.USAGE, r.code());
        assertTrue(r.err().contains("huge.rules has 50.0 MiB, more than the 256 KiB a rule file may have"), r.err());
    }

    @Test
    void historyOnADeviceFailsTheCheck() throws Exception {
        CliRun r = CliRun.of("check", "--config", config("").toString().replace("x", "x"));
        assertEquals(Main.OK, r.code(), r.err());
        Files.writeString(dir.resolve("byre.yaml"), Files.readString(dir.resolve("byre.yaml")).replace("path: history.db", "path: /dev/null"));
        r = CliRun.of("check", "--config", dir.resolve("byre.yaml").toString());
        assertEquals(Main.USAGE, r.code());
        assertTrue(r.err().contains("history.path /dev/null is not a regular file"), r.err());
        assertTrue(Files.notExists(Path.of("/dev/null-journal")));
    }
}
