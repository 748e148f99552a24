package byre.ops;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The Debian package built by {@code mvn package}: control fields, contents, conffiles; maintainer scripts and the
 * wrapper pass shellcheck; the systemd unit passes {@code systemd-analyze verify}.
 */
class PackageIT {
    @TempDir
    Path dir;

    record Result(int code, String out) {}

    static Result exec(Path dir, String... cmd) throws Exception {
        Process p = new ProcessBuilder(cmd).redirectErrorStream(true).directory(dir.toFile())
                .redirectInput(ProcessBuilder.Redirect.from(new java.io.File("/dev/null"))).start();
        String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        assertTrue(p.waitFor(120, TimeUnit.SECONDS), "did not finish: " + String.join(" ", cmd));
        return new Result(p.exitValue(), out);
    }

    static boolean onPath(String tool) {
        for (String d : System.getenv().getOrDefault("PATH", "/usr/bin:/bin").split(":")) {
            if (Files.isExecutable(Path.of(d, tool))) return true;
        }
        return false;
    }

    static Path deb() {
        Path p = Path.of(System.getProperty("byre.deb", "target/byre_0.1.0_all.deb"));
        assertTrue(Files.isRegularFile(p), "build the package first (mvn package): " + p);
        return p;
    }

    static Path root() {
        return Path.of(System.getProperty("byre.root", "..")).toAbsolutePath().normalize();
    }

    @Test
    void controlFieldsContentsAndConffiles() throws Exception {
        assumeTrue(onPath("dpkg-deb"), "dpkg-deb is not installed");
        Result info = exec(dir, "dpkg-deb", "-I", deb().toString());
        assertEquals(0, info.code(), info.out());
        assertTrue(info.out().contains(" Package: byre\n"), info.out());
        assertTrue(info.out().contains(" Architecture: all\n"), info.out());
        assertTrue(info.out().contains(" Depends: java17-runtime-headless | openjdk-17-jre-headless, adduser\n"), info.out());
        assertTrue(info.out().matches("(?s).* Version: \\d+\\.\\d+\\.\\d+\\n.*"), info.out());

        Result contents = exec(dir, "dpkg-deb", "-c", deb().toString());
        assertEquals(0, contents.code(), contents.out());
        for (String expected : List.of("-rw-r--r-- root/root .* \\./usr/share/byre/byre\\.jar", "-rwxr-xr-x root/root .* \\./usr/bin/byre",
                "-rw-r--r-- root/root .* \\./lib/systemd/system/byre\\.service", "-rw-r--r-- root/root .* \\./etc/byre/byre\\.yaml",
                "drwxr-xr-x root/root .* \\./etc/byre/rules\\.d/", "-rw-r--r-- root/root .* \\./etc/byre/rules\\.d/[a-z-]+\\.rules",
                "drwxr-xr-x root/root .* \\./var/lib/byre/",
                "-rw-r--r-- root/root .* \\./usr/share/byre/mosquitto-bridge\\.conf")) {
            assertTrue(contents.out().lines().anyMatch(l -> l.matches(expected)), expected + " in\n" + contents.out());
        }

        Path control = dir.resolve("control");
        assertEquals(0, exec(dir, "dpkg-deb", "-e", deb().toString(), control.toString()).code());
        List<String> conffiles = Files.readAllLines(control.resolve("conffiles"));
        assertTrue(conffiles.contains("/etc/byre/byre.yaml"), conffiles.toString());
        assertTrue(conffiles.stream().anyMatch(c -> c.matches("/etc/byre/rules\\.d/[a-z-]+\\.rules")), conffiles.toString());
        assertTrue(conffiles.stream().allMatch(c -> c.startsWith("/etc/byre/")), "only /etc is configuration: " + conffiles);
        for (String script : List.of("postinst", "prerm", "postrm")) {
            assertTrue(Files.isExecutable(control.resolve(script)), script + " is executable");
        }
        String postinst = Files.readString(control.resolve("postinst"));
        assertTrue(postinst.contains("adduser --system --group --home /var/lib/byre"), postinst);
        assertTrue(postinst.contains("deb-systemd-helper enable byre.service"), postinst);
        assertTrue(!postinst.contains("deb-systemd-invoke start"), "a first install must not start the unconfigured daemon");

        // The packaged jar is the one that runs.
        Path data = dir.resolve("data");
        assertEquals(0, exec(dir, "dpkg-deb", "-x", deb().toString(), data.toString()).code());
        Result version = exec(dir, Path.of(System.getProperty("java.home"), "bin", "java").toString(), "-jar",
                data.resolve("usr/share/byre/byre.jar").toString(), "--version");
        assertEquals(0, version.code(), version.out());
        assertTrue(version.out().startsWith("byre "), version.out());
    }

    @Test
    void maintainerScriptsAndWrapperPassShellcheck() throws Exception {
        assumeTrue(onPath("shellcheck"), "SKIPPED: shellcheck is not installed here (CI installs it: apt-get install shellcheck)");
        List<String> cmd = new ArrayList<>(List.of("shellcheck", "--shell=sh", "--severity=style"));
        Path control = dir.resolve("control");
        assertEquals(0, exec(dir, "dpkg-deb", "-e", deb().toString(), control.toString()).code());
        for (String script : List.of("postinst", "prerm", "postrm")) cmd.add(control.resolve(script).toString());
        Path data = dir.resolve("data");
        assertEquals(0, exec(dir, "dpkg-deb", "-x", deb().toString(), data.toString()).code());
        cmd.add(data.resolve("usr/bin/byre").toString());
        Result r = exec(dir, cmd.toArray(String[]::new));
        assertEquals(0, r.code(), "shellcheck findings:\n" + r.out());
    }

    @Test
    void systemdUnitVerifies() throws Exception {
        assumeTrue(onPath("systemd-analyze"), "SKIPPED: systemd-analyze is not installed here (CI installs it: apt-get install systemd)");
        // verify insists that ExecStart exists: point it at a stand-in, everything else as shipped.
        Path stub = dir.resolve("byre");
        Files.writeString(stub, "#!/bin/sh\n");
        stub.toFile().setExecutable(true);
        String unit = Files.readString(root().resolve("systemd/byre.service"));
        assertTrue(unit.contains("ExecStart=/usr/bin/byre run --config /etc/byre/byre.yaml"), unit);
        Path copy = dir.resolve("byre.service");
        Files.writeString(copy, unit.replace("ExecStart=/usr/bin/byre ", "ExecStart=" + stub + " "));
        Result r = exec(dir, "systemd-analyze", "verify", copy.toString());
        assertEquals(0, r.code(), "systemd-analyze verify:\n" + r.out());
        assertEquals("", r.out().strip(), "no warnings from systemd-analyze verify");
        for (String line : List.of("User=byre", "Restart=on-failure", "NoNewPrivileges=yes", "ProtectSystem=strict",
                "ReadWritePaths=/var/lib/byre", "ProtectHome=yes", "PrivateTmp=yes", "MemoryMax=256M", "WatchdogSec=",
                "ExecReload=/bin/kill -HUP $MAINPID")) {
            assertTrue(unit.contains(line), line);
        }
    }
}
