package byre.notify;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.alerts.AlertEvent;
import byre.alerts.EventKind;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The command channel runs a real script: input JSON on stdin, fields in the environment, exit codes, timeout. */
class CommandChannelTest {
    static final Instant T0 = Instant.parse("2026-07-14T13:35:00Z");
    static final AlertEvent EVENT = new AlertEvent("e1", "i1", EventKind.RAISED, "larkmoor", "calf-chill", "calf-pen-1", "critical",
            "wind-chill", 3.2, "degC", T0, T0, "Cold wind in calf-pen-1; it's \"bitter\"", null, List.of(), List.of());

    @TempDir
    Path dir;

    Path script(String body) throws Exception {
        Path p = dir.resolve("send.sh");
        Files.writeString(p, "#!/bin/sh\n" + body + "\n");
        p.toFile().setExecutable(true);
        return p;
    }

    @Test
    void passesTheJsonOnStdinAndTheFieldsInTheEnvironmentWithoutAShell() throws Exception {
        Path out = dir.resolve("out.txt");
        Path s = script("cat > \"$1\"; printf '%s|%s|%s|%s|%s|%s\\n' \"$BYRE_EVENT\" \"$BYRE_WATCH\" \"$BYRE_ZONE\" \"$BYRE_LEVEL\" \"$BYRE_INCIDENT\" \"$BYRE_MESSAGE\" >> \"$1\"");
        // an argument with shell characters arrives as one literal argument
        Path odd = dir.resolve("a b;$(echo x).txt");
        DeliveryResult r = new CommandChannel("pager-script", List.of(s.toString(), odd.toString()), Duration.ofSeconds(10)).deliver(EVENT);
        assertTrue(r.ok(), r.toString());
        List<String> lines = Files.readAllLines(odd);
        assertEquals(EVENT.toJson(), lines.get(0));
        assertEquals("raised|calf-chill|calf-pen-1|critical|i1|Cold wind in calf-pen-1; it's \"bitter\"", lines.get(1));
        assertFalse(Files.exists(out));
    }

    @Test
    void aNonZeroExitIsAFailureWithCodeAndStderr() throws Exception {
        Path s = script("cat > /dev/null; echo 'modem not answering' >&2; exit 3");
        DeliveryResult r = new CommandChannel("pager-script", List.of(s.toString()), Duration.ofSeconds(10)).deliver(EVENT);
        assertEquals(FailureReason.EXIT_CODE, r.reason());
        assertEquals(s + " exited with code 3: modem not answering", r.detail());
    }

    @Test
    void aProgramRunningPastItsTimeoutIsKilled() throws Exception {
        Path s = script("exec sleep 30");
        long start = System.nanoTime();
        DeliveryResult r = new CommandChannel("pager-script", List.of(s.toString()), Duration.ofMillis(500)).deliver(EVENT);
        assertEquals(FailureReason.TIMEOUT, r.reason(), r.toString());
        assertTrue(System.nanoTime() - start < 10_000_000_000L, "killed rather than waited for");
    }

    @Test
    void aMissingProgramIsReported() {
        DeliveryResult r = new CommandChannel("pager-script", List.of(dir.resolve("nope").toString()), Duration.ofSeconds(1)).deliver(EVENT);
        assertEquals(FailureReason.CONFIG, r.reason());
        assertTrue(r.detail().startsWith("cannot start " + dir.resolve("nope")), r.detail());
    }

    @Test
    void theProgramSeesPathLocaleAndByresFieldsOnly() throws Exception {
        Path out = dir.resolve("env.txt");
        Path s = script("cat > /dev/null; env > \"$1\"");
        // byre's own environment, as a service might have it: a password given by password-env must not leak
        java.util.Map<String, String> byreEnv = java.util.Map.of("PATH", "/usr/bin:/bin", "LANG", "en_GB.UTF-8",
                "LC_TIME", "en_GB.UTF-8", "BYRE_MQTT_PASSWORD", "larkmoor-secret", "HOME", "/var/lib/byre",
                "INVOCATION_ID", "abc", "JAVA_TOOL_OPTIONS", "-Dx=y");
        DeliveryResult r = new CommandChannel("pager-script", List.of(s.toString(), out.toString()), Duration.ofSeconds(10), byreEnv)
                .deliver(EVENT);
        assertTrue(r.ok(), r.toString());
        java.util.Map<String, String> seen = new java.util.TreeMap<>();
        for (String line : Files.readAllLines(out)) {
            int eq = line.indexOf('=');
            if (eq > 0) seen.put(line.substring(0, eq), line.substring(eq + 1));
        }
        seen.remove("PWD"); // set by the shell itself
        assertFalse(String.join("\n", Files.readAllLines(out)).contains("larkmoor-secret"));
        assertEquals(java.util.Set.of("PATH", "LANG", "LC_TIME", "BYRE_EVENT", "BYRE_WATCH", "BYRE_ZONE", "BYRE_LEVEL",
                "BYRE_MESSAGE", "BYRE_INCIDENT", "BYRE_ID", "BYRE_SITE"), seen.keySet());
        assertEquals("/usr/bin:/bin", seen.get("PATH"));
        assertEquals("raised", seen.get("BYRE_EVENT"));
    }

    @Test
    void withTheRealEnvironmentOnlyPathAndLocalePass() throws Exception {
        Path out = dir.resolve("env.txt");
        Path s = script("cat > /dev/null; env > \"$1\"");
        DeliveryResult r = new CommandChannel("pager-script", List.of(s.toString(), out.toString()), Duration.ofSeconds(10)).deliver(EVENT);
        assertTrue(r.ok(), r.toString());
        for (String line : Files.readAllLines(out)) {
            String key = line.substring(0, Math.max(0, line.indexOf('=')));
            assertTrue(key.equals("PATH") || key.equals("PWD") || key.equals("LANG") || key.equals("LANGUAGE") || key.startsWith("LC_")
                    || key.startsWith("BYRE_") || key.isEmpty(), "not passed on: " + key);
        }
    }
}
