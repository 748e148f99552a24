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
        assertTrue(info.out().contains(" Recommends: mosquitto\n"), "the barn broker (README: why not Depends)\n" + info.out());
        assertTrue(info.out().matches("(?s).* Version: \\d+\\.\\d+\\.\\d+\\n.*"), info.out());

        Result contents = exec(dir, "dpkg-deb", "-c", deb().toString());
        assertEquals(0, contents.code(), contents.out());
        for (String expected : List.of("-rw-r--r-- root/root .* \\./usr/share/byre/byre\\.jar", "-rwxr-xr-x root/root .* \\./usr/bin/byre",
                "-rw-r--r-- root/root .* \\./lib/systemd/system/byre\\.service", "-rw-r--r-- root/root .* \\./etc/byre/byre\\.yaml",
                "drwxr-xr-x root/root .* \\./etc/byre/rules\\.d/", "-rw-r--r-- root/root .* \\./etc/byre/rules\\.d/[a-z-]+\\.rules",
                "drwxr-xr-x root/root .* \\./var/lib/byre/", "-rwxr-xr-x root/root .* \\./usr/sbin/byre-broker",
                "-rw-r--r-- root/root .* \\./usr/share/byre/mosquitto-bridge\\.conf",
                "-rw-r--r-- root/root .* \\./usr/share/byre/mosquitto-barn\\.conf",
                "-rwxr-xr-x root/root .* \\./usr/lib/byre/class-archive", "-rw-r--r-- root/root .* \\./usr/share/byre/byre\\.classlist")) {
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
        // byre's broker password: made once, readable by the daemon's group only; purge removes it and the broker set-up.
        assertTrue(postinst.contains("if [ ! -e /etc/byre/mqtt.secret ]; then") && postinst.contains("chmod 0640 /etc/byre/mqtt.secret"), postinst);
        assertTrue(!postinst.contains("/etc/mosquitto/conf.d"), "installing byre never changes the farm's mosquitto by itself");
        String postrm = Files.readString(control.resolve("postrm"));
        assertTrue(postrm.contains("rm -f /etc/mosquitto/conf.d/byre.conf") && postrm.contains("rm -rf /etc/mosquitto/byre"), postrm);
        assertTrue(postrm.contains("rm -rf /var/cache/byre"), "purge removes the class-data sharing archive\n" + postrm);

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
        cmd.add(data.resolve("usr/sbin/byre-broker").toString());
        cmd.add(data.resolve("usr/lib/byre/class-archive").toString());
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
        assertTrue(unit.contains("ExecStartPre=-/usr/lib/byre/class-archive /var/cache/byre/byre.jsa"), unit);
        assertTrue(byre.testing.ByreProcess.SERVICE_JVM_OPTIONS.contains("-XX:SharedArchiveFile=/var/cache/byre/byre.jsa"),
                "the JVM maps the archive the script makes: " + byre.testing.ByreProcess.SERVICE_JVM_OPTIONS);
        assertEquals("2", byre.testing.ByreProcess.SERVICE_ENVIRONMENT.get("MALLOC_ARENA_MAX"), "tests and benchmarks run byre with the unit's environment");
        Path copy = dir.resolve("byre.service");
        Files.writeString(copy, unit.replace("ExecStart=/usr/bin/byre ", "ExecStart=" + stub + " ")
                .replace("ExecStartPre=-/usr/lib/byre/class-archive ", "ExecStartPre=-" + stub + " "));
        Result r = exec(dir, "systemd-analyze", "verify", copy.toString());
        assertEquals(0, r.code(), "systemd-analyze verify:\n" + r.out());
        assertEquals("", r.out().strip(), "no warnings from systemd-analyze verify");
        for (String line : List.of("User=byre", "Restart=on-failure", "NoNewPrivileges=yes", "ProtectSystem=strict",
                "ReadWritePaths=/var/lib/byre", "CacheDirectory=byre", "ProtectHome=yes", "PrivateTmp=yes", "MemoryMax=256M", "WatchdogSec=",
                "Environment=MALLOC_ARENA_MAX=2",
                "ExecReload=/bin/kill -HUP $MAINPID")) {
            assertTrue(unit.contains(line), line);
        }
    }

    /**
     * The packaged class-archive script with the packaged jar and class list: it makes an archive the JVM accepts (with
     * -Xshare:on an archive that does not fit is an error, not a silent fallback) and from which byre's classes are
     * mapped, with the unit's JVM options; it leaves a fitting archive alone, and remakes it when the jar changes.
     */
    @Test
    void theClassArchiveScriptMakesAnArchiveTheJvmMapsAndRemakesItWhenTheJarChanges() throws Exception {
        Path data = dir.resolve("data");
        assertEquals(0, exec(dir, "dpkg-deb", "-x", deb().toString(), data.toString()).code());
        Path jar = data.resolve("usr/share/byre/byre.jar");
        Path list = data.resolve("usr/share/byre/byre.classlist");
        List<String> classes = Files.readAllLines(list);
        for (String c : List.of("byre/cli/Main", "byre/daemon/Daemon", "byre/history/BatchLoop", "org/sqlite/JDBC",
                "org/eclipse/paho/client/mqttv3/MqttAsyncClient", "io/micrometer/prometheusmetrics/PrometheusMeterRegistry")) {
            assertTrue(classes.stream().anyMatch(l -> l.equals(c) || l.startsWith(c + " ")), c + " in the class list");
        }
        assertTrue(classes.stream().noneMatch(l -> l.startsWith("io/moquette/")), "the embedded broker of the training is not in the list");
        Path archive = dir.resolve("cache/byre.jsa");
        String opts = String.join(" ", byre.testing.ByreProcess.SERVICE_JVM_OPTIONS).replaceAll("-XX:SharedArchiveFile=\\S+", "-XX:SharedArchiveFile=" + archive);
        Result made = archiveScript(data, archive, opts);
        assertEquals(0, made.code(), made.out());
        assertTrue(made.out().contains("made " + archive), made.out());
        assertTrue(Files.size(archive) > 1_000_000, "an archive of some size");

        List<String> run = new ArrayList<>(List.of(Path.of(System.getProperty("java.home"), "bin", "java").toString()));
        run.addAll(List.of(opts.split(" ")));
        run.addAll(List.of("-Xshare:on", "-Xlog:class+load=info", "-jar", jar.toString(), "--version"));
        Result version = exec(dir, run.toArray(String[]::new));
        assertEquals(0, version.code(), version.out());
        assertTrue(version.out().lines().anyMatch(l -> l.matches(".* byre\\.cli\\.Main source: shared objects file.*")),
                "byre's classes come from the archive");

        long made1 = Files.getLastModifiedTime(archive).toMillis();
        Result again = archiveScript(data, archive, opts);
        assertEquals(0, again.code(), again.out());
        assertEquals("", again.out().strip(), "an archive that fits is left alone");
        assertEquals(made1, Files.getLastModifiedTime(archive).toMillis());

        Files.setLastModifiedTime(jar, java.nio.file.attribute.FileTime.fromMillis(Files.getLastModifiedTime(jar).toMillis() - 60_000));
        Result remade = archiveScript(data, archive, opts);
        assertTrue(remade.out().contains("made " + archive), "a changed jar gets a new archive\n" + remade.out());
        assertEquals(0, exec(dir, run.toArray(String[]::new)).code(), "and the JVM takes it");
    }

    Result archiveScript(Path data, Path archive, String opts) throws Exception {
        ProcessBuilder pb = new ProcessBuilder(data.resolve("usr/lib/byre/class-archive").toString(), archive.toString())
                .redirectErrorStream(true).directory(dir.toFile()).redirectInput(ProcessBuilder.Redirect.from(new java.io.File("/dev/null")));
        pb.environment().put("BYRE_JAR", data.resolve("usr/share/byre/byre.jar").toString());
        pb.environment().put("BYRE_CLASSLIST", data.resolve("usr/share/byre/byre.classlist").toString());
        pb.environment().put("JAVA_HOME", System.getProperty("java.home"));
        pb.environment().put("BYRE_JAVA_OPTS", opts);
        Process p = pb.start();
        String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        assertTrue(p.waitFor(120, TimeUnit.SECONDS), "class-archive did not finish");
        return new Result(p.exitValue(), out);
    }

    /** Runs the packaged byre-broker on folders of the test's (the BYRE_MOSQUITTO_* variables), never on this machine's mosquitto. */
    Result broker(Path data, Path work, String... args) throws Exception {
        List<String> cmd = new ArrayList<>(List.of(data.resolve("usr/sbin/byre-broker").toString()));
        cmd.addAll(List.of(args));
        ProcessBuilder pb = new ProcessBuilder(cmd).redirectErrorStream(true).directory(work.toFile())
                .redirectInput(ProcessBuilder.Redirect.from(new java.io.File("/dev/null")));
        var env = pb.environment();
        env.put("PATH", work.resolve("bin") + ":" + env.getOrDefault("PATH", "/usr/bin:/bin"));
        env.put("BYRE_MOSQUITTO_CONF", work.resolve("mosquitto.conf").toString());
        env.put("BYRE_MOSQUITTO_CONF_D", work.resolve("conf.d").toString());
        env.put("BYRE_MOSQUITTO_DIR", work.resolve("mosquitto-byre").toString());
        env.put("BYRE_MOSQUITTO_TEMPLATE", data.resolve("usr/share/byre/mosquitto-barn.conf").toString());
        env.put("BYRE_MOSQUITTO_SYSTEMD", work.resolve("no-systemd").toString());
        env.put("BYRE_CONFIG", work.resolve("byre.yaml").toString());
        env.put("BYRE_MQTT_SECRET", work.resolve("mqtt.secret").toString());
        Process p = pb.start();
        String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        assertTrue(p.waitFor(120, TimeUnit.SECONDS), "did not finish: " + cmd);
        return new Result(p.exitValue(), out);
    }

    @Test
    void theBrokerHelperRefusesConflictsThenSetsUpLoginsAndTheAccessList() throws Exception {
        assumeTrue(onPath("mosquitto_passwd") || Files.isExecutable(Path.of("/usr/bin/mosquitto_passwd")), "mosquitto is not installed");
        Path data = dir.resolve("data");
        assertEquals(0, exec(dir, "dpkg-deb", "-x", deb().toString(), data.toString()).code());
        assertEquals(Files.readString(root().resolve("config/mosquitto-barn.conf")), Files.readString(data.resolve("usr/share/byre/mosquitto-barn.conf")));
        Path work = Files.createDirectories(dir.resolve("work"));
        Files.createDirectories(work.resolve("conf.d"));
        Files.createDirectories(work.resolve("bin"));
        Path shim = Files.writeString(work.resolve("bin/byre"), "#!/bin/sh\nexec '" + Path.of(System.getProperty("java.home"), "bin", "java")
                + "' -jar '" + data.resolve("usr/share/byre/byre.jar") + "' \"$@\"\n");
        shim.toFile().setExecutable(true);
        Files.copy(data.resolve("etc/byre/byre.yaml"), work.resolve("byre.yaml"));
        Files.createSymbolicLink(work.resolve("rules.d"), data.resolve("etc/byre/rules.d"));
        Files.writeString(work.resolve("mqtt.secret"), "from-postinst\n");
        // Debian's stock mosquitto.conf, and a farm drop-in that already has a listener on 1883 and its own logins.
        Files.writeString(work.resolve("mosquitto.conf"), "pid_file /run/mosquitto/mosquitto.pid\npersistence true\ninclude_dir " + work.resolve("conf.d") + "\n");
        Files.writeString(work.resolve("conf.d/farm.conf"), "# the farm's weather station\nlistener 1883\npassword_file /etc/mosquitto/farm.passwd\n");

        Result refused = broker(data, work, "enable");
        assertEquals(1, refused.code(), refused.out());
        assertTrue(refused.out().contains(work.resolve("conf.d/farm.conf") + ":2:listener 1883"), refused.out());
        assertTrue(refused.out().contains(work.resolve("conf.d/farm.conf") + ":3:password_file"), refused.out());
        assertTrue(refused.out().contains("not enabled"), refused.out());
        assertTrue(!Files.exists(work.resolve("conf.d/byre.conf")), "nothing installed on a conflict");

        Files.delete(work.resolve("conf.d/farm.conf"));
        assertEquals(0, broker(data, work, "check").code());
        Result enabled = broker(data, work, "enable");
        assertEquals(0, enabled.code(), enabled.out());
        assertEquals(Files.readString(data.resolve("usr/share/byre/mosquitto-barn.conf")), Files.readString(work.resolve("conf.d/byre.conf")));
        assertEquals("0640", mode(work.resolve("mosquitto-byre/passwd")));
        assertTrue(Files.readString(work.resolve("mosquitto-byre/passwd")).matches("byre:\\$7\\$[^\\n]+\\n"), "byre's login, hashed");
        String acl = Files.readString(work.resolve("mosquitto-byre/acl"));
        assertTrue(acl.contains("\nuser byre\ntopic read larkmoor/calf-barn/pen1/dry\n") && acl.contains("\nuser operators\ntopic write byre/larkmoor/ack\n")
                && acl.contains("\nuser sensors\ntopic write larkmoor/calf-barn/pen1/dry\n"), acl);
        assertEquals(0, broker(data, work, "check").code(), "byre's own drop-in is no conflict");

        Result gateway = broker(data, work, "passwd", "pen2-gateway", "--random");
        assertEquals(0, gateway.code(), gateway.out());
        assertTrue(gateway.out().matches("(?s)pen2-gateway: [0-9a-f]{36}\n"), gateway.out());
        assertTrue(Files.readString(work.resolve("mosquitto-byre/acl")).contains("\nuser pen2-gateway\ntopic write larkmoor/calf-barn/pen1/dry\n"));
        assertEquals(0, broker(data, work, "remove", "pen2-gateway").code());
        assertTrue(!Files.readString(work.resolve("mosquitto-byre/acl")).contains("pen2-gateway"));
        Result badName = broker(data, work, "passwd", "bad name", "--random");
        assertEquals(1, badName.code(), badName.out());
        assertTrue(!Files.readString(work.resolve("mosquitto-byre/acl")).contains("bad"), "a bad login name is refused");
    }

    static String mode(Path p) throws Exception {
        var perms = Files.getPosixFilePermissions(p);
        int m = 0;
        for (var x : perms) m |= 1 << (8 - x.ordinal());
        return String.format("%04o", m);
    }
}
