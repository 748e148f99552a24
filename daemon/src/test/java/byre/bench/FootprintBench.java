package byre.bench;

import byre.demo.LoadConfig;
import byre.demo.LoadMain;
import byre.testing.Mosquitto;
import java.io.PrintStream;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.concurrent.TimeUnit;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * Resource targets of issue 6 (a benchmark, not a test): the packaged jar started as the systemd unit starts it (its
 * JVM options, environment and class-data sharing archive, see {@link ServiceJvm}), a real mosquitto, 200 sensors in
 * 50 zones at one reading per second each. Prints start-up to the first stored reading, resident memory idle and under
 * load, and their ratio against an empty JVM started with the same options in the same run.
 *
 * <pre>
 * mvn -q -pl daemon -am package -DskipTests
 * java -cp daemon/target/test-classes:daemon/target/byre.jar byre.bench.FootprintBench [seconds=60] [runs=3]
 * </pre>
 */
public final class FootprintBench {
    static final HttpClient HTTP = HttpClient.newHttpClient();

    public static void main(String[] args) throws Exception {
        int seconds = args.length > 0 ? Integer.parseInt(args[0]) : 60;
        int runs = args.length > 1 ? Integer.parseInt(args[1]) : 3;
        Path jar = Path.of(System.getProperty("byre.jar", "daemon/target/byre.jar")).toAbsolutePath();
        String javaBin = Path.of(System.getProperty("java.home"), "bin", "java").toString();
        Path work = Files.createTempDirectory("byre-footprint");
        try {
            List<String> flags = ServiceJvm.options(work, jar);
            System.out.printf(Locale.ROOT, "flags: %s; environment: %s%n", String.join(" ", flags), ServiceJvm.environment());
            for (int run = 1; run <= runs; run++) measure(run, seconds, javaBin, jar, flags, Files.createDirectories(work.resolve("run" + run)));
        } finally {
            try (var walk = Files.walk(work)) {
                walk.sorted(java.util.Comparator.reverseOrder()).forEach(f -> f.toFile().delete());
            }
        }
    }

    static void measure(int run, int seconds, String javaBin, Path jar, List<String> flags, Path dir) throws Exception {
        long emptyKb = emptyJvmRssKb(javaBin, flags);
        try (Mosquitto broker = Mosquitto.start(); HookSink sink = new HookSink()) {
            int admin = Mosquitto.freePort();
            Path rules = Files.createDirectories(dir.resolve("rules.d"));
            // The target: 200 sensors at one reading a second with 50 watches.
            BenchRules.write(rules, 50, false);
            Path cfg = dir.resolve("byre.yaml");
            Files.writeString(cfg, BenchRules.config(LoadConfig.yaml(200, 50, broker.uri(), null, "load", rules, dir.resolve("history.db")),
                    sink, false) + "\nadmin:\n  listen: 127.0.0.1:" + admin + "\n");
            List<String> cmd = new ArrayList<>(List.of(javaBin));
            cmd.addAll(flags);
            cmd.addAll(List.of("-jar", jar.toString(), "run", "--config", cfg.toString()));
            ProcessBuilder pb = new ProcessBuilder(cmd).redirectErrorStream(true).redirectOutput(dir.resolve("daemon.log").toFile());
            pb.environment().putAll(ServiceJvm.environment());
            long t0 = System.nanoTime();
            Process p = pb.start();
            try {
                // Publish a first reading again and again until it is committed: launch -> first stored reading.
                double startupS = Double.NaN;
                try (byre.testing.TestPublisher pub = new byre.testing.TestPublisher(broker.uri())) {
                    while (System.nanoTime() - t0 < 60_000_000_000L) {
                        pub.publish(firstTopic(cfg), "{\"v\":20.5}");
                        if (metric(admin, "byre_history_rows_written") > 0) {
                            startupS = (System.nanoTime() - t0) / 1e9;
                            break;
                        }
                        Thread.sleep(20);
                    }
                }
                Thread.sleep(2000);
                long idleKb = rssKb(p.pid());
                LoadMain.Result r = LoadMain.run(LoadMain.Options.parse("--broker", broker.uri(), "--rate", "200", "--sensors", "200",
                        "--zones", "50", "--duration", seconds + "s", "--qos", "1"), new PrintStream(java.io.OutputStream.nullOutputStream()));
                long loadKb = rssKb(p.pid());
                long peakKb = hwmKb(p.pid());
                System.out.printf(Locale.ROOT, "run %d: launch->first stored reading %.2f s; RSS empty JVM %.1f MB, idle %.1f MB, "
                                + "after %d s at 200 readings/s %.1f MB (peak %.1f MB); ratio load/empty-JVM %.2f; published %d, failed %d%n",
                        run, startupS, emptyKb / 1000.0, idleKb / 1000.0, seconds, loadKb / 1000.0, peakKb / 1000.0,
                        (double) loadKb / emptyKb, r.sent(), r.failed());
            } finally {
                p.destroy();
                p.waitFor(30, TimeUnit.SECONDS);
            }
        }
    }

    static String firstTopic(Path cfg) throws Exception {
        Matcher m = Pattern.compile("topic: ([^,]+),").matcher(Files.readString(cfg));
        if (!m.find()) throw new IllegalStateException("no topic in " + cfg);
        return m.group(1).strip();
    }

    static double metric(int port, String name) {
        try {
            String body = HTTP.send(HttpRequest.newBuilder(URI.create("http://127.0.0.1:" + port + "/metrics")).GET().build(),
                    HttpResponse.BodyHandlers.ofString()).body();
            Matcher m = Pattern.compile("(?m)^" + name + " ([0-9.E+-]+)$").matcher(body);
            return m.find() ? Double.parseDouble(m.group(1)) : 0;
        } catch (Exception e) {
            return 0;
        }
    }

    /** The baseline: a JVM that only sleeps, with the same flags. */
    public static final class Idle {
        public static void main(String[] a) throws Exception {
            Thread.sleep(60_000);
        }
    }

    /** The empty JVM: the same options and environment, without the archive, which holds byre's classes, not its. */
    static long emptyJvmRssKb(String java, List<String> flags) throws Exception {
        List<String> cmd = new ArrayList<>(List.of(java));
        for (String f : flags) if (!f.startsWith(ServiceJvm.ARCHIVE_OPTION)) cmd.add(f);
        cmd.addAll(List.of("-cp", System.getProperty("java.class.path"), Idle.class.getName()));
        ProcessBuilder pb = new ProcessBuilder(cmd);
        pb.environment().putAll(ServiceJvm.environment());
        Process p = pb.start();
        try {
            Thread.sleep(2000);
            return rssKb(p.pid());
        } finally {
            p.destroy();
            p.waitFor(10, TimeUnit.SECONDS);
        }
    }

    static long rssKb(long pid) throws Exception {
        return status(pid, "VmRSS:");
    }

    static long hwmKb(long pid) throws Exception {
        return status(pid, "VmHWM:");
    }

    private static long status(long pid, String key) throws Exception {
        for (String l : Files.readAllLines(Path.of("/proc/" + pid + "/status"))) {
            if (l.startsWith(key)) return Long.parseLong(l.replaceAll("[^0-9]", ""));
        }
        return -1;
    }
}
