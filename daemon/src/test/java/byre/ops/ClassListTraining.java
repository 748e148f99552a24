package byre.ops;

import byre.mqtt.EmbeddedBroker;
import byre.testing.ByreProcess;
import com.sun.net.httpserver.HttpServer;
import java.io.IOException;
import java.io.InputStream;
import java.net.InetSocketAddress;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.UUID;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.eclipse.paho.client.mqttv3.MqttClient;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;

/**
 * Writes the class list the package ships for class-data sharing ({@code /usr/share/byre/byre.classlist}; the service
 * maps the archive made from it, see {@code daemon/src/deb/lib/class-archive}). The build runs it after the jar is
 * made: the packaged jar runs as the unit runs it ({@code byre run}, the unit's JVM options) with the example
 * configuration and rule packs the package installs, against a broker and a webhook receiver of this process, while
 * the JVM records every class it loads. It stores readings, raises one alert (delivered over HTTP), serves the barn
 * page and the metrics once, and is stopped as systemd stops it: the list holds what a barn's byre loads at start and
 * soon after, no more (an archive of classes never used would only take memory).
 *
 * <p>Usage, from {@code daemon/}: {@code ClassListTraining target/byre.jar target/byre.classlist} (test classes and
 * the jar on the class path).
 */
public final class ClassListTraining {
    static final Path EXAMPLE_CONFIG = Path.of("../config/byre.example.yaml");
    static final Path EXAMPLE_RULES = Path.of("../rules/examples");

    public static void main(String[] args) throws Exception {
        Path jar = Path.of(args[0]).toAbsolutePath();
        Path out = Path.of(args[1]).toAbsolutePath();
        Path dir = Files.createTempDirectory("byre-classlist");
        try {
            train(jar, out, dir);
        } finally {
            try (var walk = Files.walk(dir)) {
                walk.sorted(Comparator.reverseOrder()).forEach(f -> f.toFile().delete());
            }
        }
    }

    static void train(Path jar, Path out, Path dir) throws Exception {
        int mqtt = EmbeddedBroker.freePort("127.0.0.1");
        AtomicInteger hooks = new AtomicInteger();
        HttpServer sink = HttpServer.create(new InetSocketAddress("127.0.0.1", 0), 8);
        sink.createContext("/", ex -> {
            try (InputStream in = ex.getRequestBody()) {
                in.readAllBytes();
            }
            hooks.incrementAndGet();
            ex.sendResponseHeaders(200, -1);
            ex.close();
        });
        sink.start();
        try (EmbeddedBroker broker = EmbeddedBroker.start("127.0.0.1", mqtt)) {
            int admin = EmbeddedBroker.freePort("127.0.0.1");
            int page = EmbeddedBroker.freePort("127.0.0.1");
            Path rules = Files.createDirectories(dir.resolve("rules.d"));
            try (var files = Files.list(EXAMPLE_RULES)) {
                for (Path f : files.filter(f -> f.toString().endsWith(".rules")).toList()) Files.copy(f, rules.resolve(f.getFileName()));
            }
            // One watch without a hold time, so that an alert goes out within the training.
            Files.writeString(rules.resolve("training.rules"), "watch training-heat\n  raise when calf-pen-1.dry-bulb > 30 C\n"
                    + "  clear when calf-pen-1.dry-bulb < 28 C\n  level warning\n  notify night-phone\n");
            Path cfg = dir.resolve("byre.yaml");
            Files.writeString(cfg, config(Files.readString(EXAMPLE_CONFIG), mqtt, admin, page,
                    "http://127.0.0.1:" + sink.getAddress().getPort() + "/hook", dir.resolve("history.db")));

            Path partial = out.resolveSibling(out.getFileName() + ".part");
            Files.deleteIfExists(partial);
            List<String> cmd = new ArrayList<>(List.of(Path.of(System.getProperty("java.home"), "bin", "java").toString()));
            for (String o : ByreProcess.SERVICE_JVM_OPTIONS) if (!o.startsWith("-XX:SharedArchiveFile=")) cmd.add(o);
            // Every class loaded from its source, none from an archive: the list must name them all.
            cmd.addAll(List.of("-Xshare:off", "-XX:DumpLoadedClassList=" + partial, "-jar", jar.toString(), "run", "--config", cfg.toString()));
            ProcessBuilder pb = new ProcessBuilder(cmd).redirectErrorStream(true).redirectOutput(dir.resolve("byre.log").toFile());
            pb.environment().putAll(ByreProcess.SERVICE_ENVIRONMENT);
            Process byre = pb.start();
            try {
                exercise(byre, mqtt, admin, page, hooks, dir);
            } finally {
                byre.destroy(); // SIGTERM, as systemd stops the service
                if (!byre.waitFor(30, TimeUnit.SECONDS)) byre.destroyForcibly().waitFor(10, TimeUnit.SECONDS);
            }
            long lines;
            try (var l = Files.lines(partial)) {
                lines = l.count();
            }
            Files.move(partial, out, StandardCopyOption.REPLACE_EXISTING);
            System.out.println("class list: " + lines + " lines in " + out);
        } finally {
            sink.stop(0);
        }
    }

    /** Readings until one is stored, then the alert, the barn page and the metrics. */
    static void exercise(Process byre, int mqtt, int admin, int page, AtomicInteger hooks, Path dir) throws Exception {
        HttpClient http = HttpClient.newHttpClient();
        MqttClient pub = new MqttClient("tcp://127.0.0.1:" + mqtt, "training-" + UUID.randomUUID().toString().substring(0, 8), new MemoryPersistence());
        long deadline = System.nanoTime() + TimeUnit.SECONDS.toNanos(60);
        try {
            while (true) {
                if (!byre.isAlive() || System.nanoTime() > deadline) {
                    throw new IllegalStateException("byre did not store a reading and deliver an alert within 60 s:\n"
                            + Files.readString(dir.resolve("byre.log")));
                }
                try {
                    if (!pub.isConnected()) {
                        MqttConnectOptions o = new MqttConnectOptions();
                        o.setCleanSession(true);
                        pub.connect(o);
                    }
                    pub.publish("larkmoor/calf-barn/pen1/dry", "35.0".getBytes(StandardCharsets.UTF_8), 1, false);
                    pub.publish("larkmoor/calf-barn/pen1/wet", "24.0".getBytes(StandardCharsets.UTF_8), 1, false);
                    pub.publish("larkmoor/cow-shed/dry", "21.5".getBytes(StandardCharsets.UTF_8), 1, false);
                } catch (org.eclipse.paho.client.mqttv3.MqttException e) {
                    // byre's embedded-broker relay is not up yet, or byre is still starting: try again
                }
                if (metric(http, admin, "byre_history_rows_written") > 0 && hooks.get() > 0) break;
                Thread.sleep(50);
            }
            for (String url : List.of("http://127.0.0.1:" + page + "/", "http://127.0.0.1:" + admin + "/metrics",
                    "http://127.0.0.1:" + admin + "/health")) {
                http.send(HttpRequest.newBuilder(URI.create(url)).GET().build(), HttpResponse.BodyHandlers.discarding());
            }
        } finally {
            if (pub.isConnected()) pub.disconnect();
            pub.close();
        }
    }

    static double metric(HttpClient http, int admin, String name) {
        try {
            String body = http.send(HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + admin + "/metrics")).GET().build(),
                    HttpResponse.BodyHandlers.ofString()).body();
            Matcher m = Pattern.compile("(?m)^" + name + " ([0-9.E+-]+)$").matcher(body);
            return m.find() ? Double.parseDouble(m.group(1)) : 0;
        } catch (IOException e) {
            return 0;
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            return 0;
        }
    }

    /** The example configuration pointed at this training's broker, receiver, ports and a history of its own. */
    static String config(String example, int mqtt, int admin, int page, String hook, Path history) {
        String y = example;
        y = replace(y, "(?m)^  broker: tcp://[^ ]+", "  broker: tcp://127.0.0.1:" + mqtt);
        y = replace(y, "(?m)^  username: .*\\n", "");
        y = replace(y, "(?m)^  password-file: .*\\n", "");
        y = replace(y, "(?m)^  client-id: [^ ]+", "  client-id: byre-training");
        y = replace(y, "url: \"https://push\\.example/hook\"", "url: \"" + hook + "\"");
        y = replace(y, "(?m)^  path: /var/lib/byre/history\\.db", "  path: \"" + history + "\"");
        y = replace(y, "(?m)^  listen: 127\\.0\\.0\\.1:9466", "  listen: 127.0.0.1:" + admin);
        y = replace(y, "(?m)^  listen: 127\\.0\\.0\\.1:9467", "  listen: 127.0.0.1:" + page);
        return y;
    }

    private static String replace(String text, String regex, String replacement) {
        Matcher m = Pattern.compile(regex).matcher(text);
        if (!m.find()) throw new IllegalStateException("the example configuration changed: no match for " + regex + "; update ClassListTraining");
        return m.replaceFirst(Matcher.quoteReplacement(replacement));
    }
}
