package byre.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.File;
import java.nio.charset.StandardCharsets;
import java.util.List;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;

/** {@code byre demo} as a user runs it: a separate JVM that prints zone lines, exits 0 and leaves nothing behind. */
class DemoCommandTest {
    @Test
    void demoPrintsZoneLinesAndExitsCleanly() throws Exception {
        String java = System.getProperty("java.home") + File.separator + "bin" + File.separator + "java";
        Process p = new ProcessBuilder(List.of(java, "-Xmx128m", "-cp", System.getProperty("java.class.path"),
                "byre.cli.Main", "demo", "--duration", "8s", "--speed", "900", "--every", "60m"))
                .redirectErrorStream(true).start();
        boolean exited = p.waitFor(60, TimeUnit.SECONDS);
        String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        if (!exited) p.destroyForcibly();
        assertTrue(exited, "demo did not stop by itself:\n" + out);
        assertEquals(0, p.exitValue(), out);
        for (String zone : List.of("calf-pen-1", "calf-pen-2", "cow-shed")) {
            assertTrue(out.lines().anyMatch(l -> l.contains(zone) && l.contains("THI")), "no line for " + zone + ":\n" + out);
        }
        assertTrue(out.contains("byre demo: stopped."), out);
        assertTrue(p.descendants().findAny().isEmpty(), "a child process was left behind");
    }

    @Test
    void badDurationIsAUsageError() {
        assertEquals(Main.USAGE, Main.execute("demo", "--duration", "soon"));
    }
}
