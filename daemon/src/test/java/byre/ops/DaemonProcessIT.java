package byre.ops;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.testing.TestPublisher;
import java.io.IOException;
import java.net.ServerSocket;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The packaged jar as its own process, as systemd runs it (the unit's small-heap flags): admin API answers,
 * counters move with readings published by a Paho client to the embedded broker, and {@code byre status} and
 * {@code byre history} read the database while the daemon writes it.
 */
class DaemonProcessIT {
    static final String JVM_FLAGS = String.join(" ", byre.testing.ByreProcess.SERVICE_JVM_OPTIONS);

    @TempDir
    Path dir;
    Process daemon;
    final HttpClient http = HttpClient.newBuilder().connectTimeout(Duration.ofSeconds(2)).build();

    static Path jar() {
        Path p = Path.of(System.getProperty("byre.jar", "target/byre.jar"));
        assertTrue(Files.isRegularFile(p), "build the jar first (mvn package): " + p);
        return p;
    }

    static int freePort() throws IOException {
        try (ServerSocket s = new ServerSocket(0, 1, java.net.InetAddress.getLoopbackAddress())) {
            return s.getLocalPort();
        }
    }

    static List<String> java(String... args) {
        List<String> cmd = new ArrayList<>();
        cmd.add(Path.of(System.getProperty("java.home"), "bin", "java").toString());
        cmd.addAll(List.of(JVM_FLAGS.split(" ")));
        cmd.add("-jar");
        cmd.add(jar().toString());
        cmd.addAll(List.of(args));
        return cmd;
    }

    Path config(int brokerPort, int adminPort) throws IOException {
        Path token = dir.resolve("admin.token");
        Files.writeString(token, "larkmoor-test-token\n");
        Path cfg = dir.resolve("byre.yaml");
        Files.writeString(cfg, """
                site: larkmoor
                timezone: Europe/London
                units: metric
                mqtt:
                  broker: embedded
                  listen: 127.0.0.1:%d
                  client-id: byre-it-%d
                sensors:
                  pen1-dry: { topic: larkmoor/calf-barn/pen1/dry, quantity: dry-bulb, unit: C }
                  pen1-wet: { topic: larkmoor/calf-barn/pen1/wet, quantity: wet-bulb, unit: C }
                zones:
                  calf-pen-1: { groups: [calves], sensors: [pen1-dry, pen1-wet], max-age: 5m }
                history:
                  path: %s
                admin:
                  listen: 127.0.0.1:%d
                  token-file: %s
                """.formatted(brokerPort, brokerPort, dir.resolve("history.db"), adminPort, token));
        return cfg;
    }

    HttpResponse<String> get(int port, String path) throws Exception {
        return http.send(HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + port + path)).timeout(Duration.ofSeconds(5)).GET().build(),
                HttpResponse.BodyHandlers.ofString());
    }

    static double counter(String metrics, String name, String labels) {
        Matcher m = Pattern.compile("(?m)^" + Pattern.quote(name + labels) + " ([0-9.E+-]+)$").matcher(metrics);
        return m.find() ? Double.parseDouble(m.group(1)) : 0;
    }

    static String run(Path dir, List<String> cmd) throws Exception {
        Path out = Files.createTempFile(dir, "cli", ".out");
        Process p = new ProcessBuilder(cmd).redirectErrorStream(true).redirectOutput(out.toFile())
                .redirectInput(ProcessBuilder.Redirect.from(new java.io.File("/dev/null"))).directory(dir.toFile()).start();
        if (!p.waitFor(90, TimeUnit.SECONDS)) {
            p.destroyForcibly().waitFor(10, TimeUnit.SECONDS);
            throw new AssertionError("command did not finish in 90 s: " + cmd + "\n" + Files.readString(out));
        }
        String text = Files.readString(out, StandardCharsets.UTF_8);
        assertEquals(0, p.exitValue(), "exit code of " + cmd + "\n" + text);
        return text;
    }

    @AfterEach
    void stop() throws Exception {
        if (daemon != null && daemon.isAlive()) {
            daemon.destroy();
            if (!daemon.waitFor(20, TimeUnit.SECONDS)) daemon.destroyForcibly().waitFor(10, TimeUnit.SECONDS);
        }
    }

    @Test
    void metricsHealthStatusAndHistoryOfARunningDaemon() throws Exception {
        int brokerPort = freePort();
        int adminPort = freePort();
        Path cfg = config(brokerPort, adminPort);
        Path log = dir.resolve("daemon.log");
        daemon = new ProcessBuilder(java("run", "--config", cfg.toString())).redirectErrorStream(true)
                .redirectOutput(log.toFile()).directory(dir.toFile()).start();

        await().atMost(Duration.ofSeconds(60)).pollInterval(Duration.ofMillis(200)).ignoreExceptions()
                .until(() -> get(adminPort, "/health").statusCode() == 200);
        assertEquals("{\"healthy\":true,\"problems\":[]}\n", get(adminPort, "/health").body());
        String before = get(adminPort, "/metrics").body();
        assertTrue(before.contains("jvm_memory_used_bytes"), "JVM meters are bound");
        assertTrue(before.contains("process_uptime_seconds"), "process meters are bound");
        assertEquals(0.0, counter(before, "byre_readings_received_total", "{sensor=\"pen1-dry\"}"));

        try (TestPublisher pub = new TestPublisher("tcp://127.0.0.1:" + brokerPort)) {
            for (int i = 0; i < 5; i++) pub.publish("larkmoor/calf-barn/pen1/dry", Double.toString(4.0 + i * 0.25));
            pub.publish("larkmoor/calf-barn/pen1/wet", "3.5");
            pub.publish("larkmoor/calf-barn/pen1/dry", "warm");
        }
        await().atMost(Duration.ofSeconds(20)).pollInterval(Duration.ofMillis(200)).until(() -> {
            String m = get(adminPort, "/metrics").body();
            return counter(m, "byre_readings_received_total", "{sensor=\"pen1-dry\"}") == 5.0
                    && counter(m, "byre_readings_received_total", "{sensor=\"pen1-wet\"}") == 1.0;
        });
        String after = get(adminPort, "/metrics").body();
        assertEquals(1.0, counter(after, "byre_readings_rejected_total", "{reason=\"unparseable\"}"), "'warm' is no number");
        // Readings that arrive within a second of each other are derived together on the next tick (zone pacing).
        await().atMost(Duration.ofSeconds(5)).pollInterval(Duration.ofMillis(100)).until(() ->
                counter(get(adminPort, "/metrics").body(), "byre_derivations_total", "{zone=\"calf-pen-1\"}") >= 1.0);

        String status = get(adminPort, "/status").body();
        assertTrue(status.contains("\"calf-pen-1\":{\"dry-bulb\":{\"value\":5,\"unit\":\"C\""), status);
        HttpResponse<String> ack = http.send(HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + adminPort + "/ack"))
                .POST(HttpRequest.BodyPublishers.ofString("{\"incident\":\"x\"}")).build(), HttpResponse.BodyHandlers.ofString());
        assertEquals(401, ack.statusCode());

        // The writer commits in batches of at most two seconds; then the CLI sees the rows while the daemon runs.
        String[] lastExport = {""};
        try {
            await().atMost(Duration.ofSeconds(120)).pollInterval(Duration.ofMillis(500)).until(() ->
                    (lastExport[0] = run(dir, java("history", "--config", cfg.toString(), "--sensor", "pen1-dry", "--csv"))).lines().count() >= 6);
        } catch (org.awaitility.core.ConditionTimeoutException e) {
            throw new AssertionError("history export never showed the 5 readings; last output:\n" + lastExport[0]
                    + "\ndaemon log:\n" + Files.readString(log), e);
        }
        String csv = run(dir, java("history", "--config", cfg.toString(), "--zone", "calf-pen-1", "--quantity", "dry-bulb", "--csv"));
        assertTrue(csv.startsWith("time,dry-bulb (degC)\r\n"), csv);
        // Zone streams are stored at most once a minute (raw readings always): the first, 4 C, is the stored one.
        assertTrue(csv.matches("time,dry-bulb \\(degC\\)\r\n\\S+Z,4\r\n"), csv);
        String screen = run(dir, java("status", "--config", cfg.toString()));
        assertTrue(screen.contains("daemon: running, healthy"), screen);
        assertTrue(screen.contains("calf-pen-1 (calves)"), screen);
        // The live value (5 C) comes from the daemon's /status, newer than the stored one.
        assertTrue(screen.matches("(?s).*\n  dry-bulb +5\\.0 C .*"), screen);
        assertTrue(!screen.contains("\u001b["), "no colour in a pipe");

        daemon.destroy();
        assertTrue(daemon.waitFor(30, TimeUnit.SECONDS), "SIGTERM stops the daemon");
        String logText = Files.readString(log);
        assertTrue(logText.contains("admin API on http://127.0.0.1:" + adminPort), logText);
        assertTrue(!logText.contains("larkmoor-test-token"), "the token never reaches the log");
    }
}
