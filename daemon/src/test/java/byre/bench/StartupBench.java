package byre.bench;

import byre.demo.LoadConfig;
import byre.history.HistoryStore;
import byre.history.HistoryWriter;
import byre.history.Retention;
import byre.history.StreamKey;
import byre.testing.Mosquitto;
import byre.testing.TestPublisher;
import java.io.BufferedReader;
import java.io.IOException;
import java.io.InputStreamReader;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneOffset;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Comparator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicBoolean;

/**
 * Launch to the first stored reading (a benchmark, not a test): the packaged jar, started as the systemd unit starts it
 * (its JVM options and environment, read from {@code systemd/byre.service}), with a history of 14 days of 200 sensors
 * and the 50 watches of the other benchmarks, against a real mosquitto. Each round starts, in turn:
 * <ul>
 *   <li>byre as the unit runs it, with the class-data sharing archive made by the package's own script
 *       ({@code daemon/src/deb/lib/byre-archive}) from the class list of the build;</li>
 *   <li>the same without the archive (what the first start of a fresh install does before the archive exists);</li>
 *   <li>the baseline, {@link BareStore}: a JVM with the same options that opens an SQLite file, connects a bare Paho
 *       client, subscribes and commits the first reading it gets.</li>
 * </ul>
 * The time runs from just before the process is started to the moment the bench sees the reading stored: it publishes
 * a reading every 20 ms and asks byre's admin API for {@code byre_history_rows_written} (the baseline prints a line).
 * Medians of the rounds, and the ratio to the baseline taken round by round (the machine's speed drifts).
 *
 * <pre>
 * mvn -q -B -o -pl daemon -am package -DskipTests
 * java -cp daemon/target/test-classes:daemon/target/byre.jar byre.bench.StartupBench [--rounds 7] [--every 60s] [--days 14]
 * </pre>
 */
public final class StartupBench {
    static final int SENSORS = 200;
    static final int ZONES = 50;

    record Variant(String name, List<String> command, Map<String, String> env, boolean byre) {}

    public static void main(String[] args) throws Exception {
        int rounds = 7;
        Duration every = Duration.ofSeconds(60);
        int days = 14;
        for (int i = 0; i + 1 < args.length; i += 2) {
            switch (args[i]) {
                case "--rounds": rounds = Integer.parseInt(args[i + 1]); break;
                case "--every": every = byre.config.Durations.parse(args[i + 1]).orElseThrow(); break;
                case "--days": days = Integer.parseInt(args[i + 1]); break;
                default: throw new IllegalArgumentException("unknown option " + args[i] + " (--rounds N, --every 60s, --days 14)");
            }
        }
        Path jar = Path.of(System.getProperty("byre.jar", "daemon/target/byre.jar")).toAbsolutePath();
        if (!Files.isRegularFile(jar)) throw new IllegalStateException("build the jar first (mvn package): " + jar);
        String java = Path.of(System.getProperty("java.home"), "bin", "java").toString();
        Path dir = Files.createTempDirectory("byre-startup");
        try {
            // The bench seeds the history itself: SQLite's native library goes to a folder of its own.
            byre.history.SqliteNative.prepare(Files.createDirectories(dir.resolve("lib")));
            Path db = dir.resolve("history.db");
            long t0 = System.nanoTime();
            long rows = seed(db, days, every);
            System.out.printf(Locale.ROOT, "history: %d readings of %d sensors over %d days (one every %s each), %.0f MB, seeded in %.0f s%n",
                    rows, SENSORS, days, every, Files.size(db) / 1e6, (System.nanoTime() - t0) / 1e9);
            try (Mosquitto broker = Mosquitto.start(); HookSink sink = new HookSink(); TestPublisher pub = new TestPublisher(broker.uri())) {
                int admin = Mosquitto.freePort();
                Path rules = Files.createDirectories(dir.resolve("rules.d"));
                BenchRules.write(rules, ZONES, false);
                Path cfg = dir.resolve("byre.yaml");
                Files.writeString(cfg, BenchRules.config(LoadConfig.yaml(SENSORS, ZONES, broker.uri(), null, "load", rules, db), sink, false)
                        + "\nadmin:\n  listen: 127.0.0.1:" + admin + "\n");
                String topic = LoadConfig.topic("load", 0, SENSORS, ZONES);
                List<Variant> variants = variants(java, jar, dir, cfg, broker.uri(), topic);
                Map<String, List<Double>> seconds = new LinkedHashMap<>();
                for (Variant v : variants) seconds.put(v.name(), new ArrayList<>());
                for (int round = 0; round <= rounds; round++) {
                    for (Variant v : variants) {
                        double s = launchToFirstStored(v, pub, topic, admin, dir);
                        if (round > 0) seconds.get(v.name()).add(s); // round 0 warms the page cache and the broker
                    }
                }
                print(seconds, variants.get(variants.size() - 1).name());
            }
        } finally {
            try (var walk = Files.walk(dir)) {
                walk.sorted(Comparator.reverseOrder()).forEach(f -> f.toFile().delete());
            }
        }
    }

    static List<Variant> variants(String java, Path jar, Path dir, Path cfg, String broker, String topic) throws Exception {
        Map<String, String> env = ServiceJvm.environment();
        List<String> unit = ServiceJvm.options(dir, jar);
        List<String> plain = ServiceJvm.withoutArchive();
        List<String> byreArgs = List.of("-jar", jar.toString(), "run", "--config", cfg.toString());
        List<Variant> out = new ArrayList<>();
        out.add(new Variant("byre as the unit starts it", concat(List.of(java), unit, byreArgs), env, true));
        if (!unit.equals(plain)) {
            out.add(new Variant("byre without the class-data sharing archive", concat(List.of(java), plain, byreArgs), env, true));
        }
        List<String> bare = concat(List.of(java), plain, List.of("-Dorg.sqlite.tmpdir=" + Files.createDirectories(dir.resolve("bare-lib")),
                "-cp", System.getProperty("java.class.path"), BareStore.class.getName(), broker, topic, dir.resolve("bare.db").toString()));
        out.add(new Variant("bare Paho + SQLite store (baseline)", bare, env, false));
        return out;
    }

    @SafeVarargs
    static List<String> concat(List<String>... parts) {
        List<String> out = new ArrayList<>();
        for (List<String> p : parts) out.addAll(p);
        return out;
    }

    /** Starts the variant, publishes a reading every 20 ms until it is stored, stops the process; seconds from launch. */
    static double launchToFirstStored(Variant v, TestPublisher pub, String topic, int admin, Path dir) throws Exception {
        ProcessBuilder pb = new ProcessBuilder(v.command()).redirectErrorStream(true);
        pb.environment().putAll(v.env());
        if (v.byre()) pb.redirectOutput(dir.resolve("byre.log").toFile());
        AtomicBoolean stored = new AtomicBoolean();
        long t0 = System.nanoTime();
        Process p = pb.start();
        try {
            if (!v.byre()) {
                Thread reader = new Thread(() -> {
                    try (BufferedReader r = new BufferedReader(new InputStreamReader(p.getInputStream(), StandardCharsets.UTF_8))) {
                        for (String line; (line = r.readLine()) != null; ) if (line.equals("stored")) stored.set(true);
                    } catch (IOException ignored) {
                        // the process ended
                    }
                }, "bare-output");
                reader.setDaemon(true);
                reader.start();
            }
            while (System.nanoTime() - t0 < 60_000_000_000L && p.isAlive()) {
                pub.publish(topic, "{\"v\":20.5,\"ts\":" + System.currentTimeMillis() + "}");
                if (v.byre() ? FootprintBench.metric(admin, "byre_history_rows_written") > 0 : stored.get()) return (System.nanoTime() - t0) / 1e9;
                Thread.sleep(20);
            }
            throw new IllegalStateException(v.name() + ": no reading stored within 60 s (exit " + (p.isAlive() ? "-" : p.exitValue()) + ")"
                    + (v.byre() ? "\n" + Files.readString(dir.resolve("byre.log")) : ""));
        } finally {
            p.destroy();
            if (!p.waitFor(30, TimeUnit.SECONDS)) p.destroyForcibly().waitFor(10, TimeUnit.SECONDS);
        }
    }

    static void print(Map<String, List<Double>> seconds, String baseline) {
        List<Double> base = seconds.get(baseline);
        System.out.printf(Locale.ROOT, "| %-58s | %-22s | %-18s |%n", "launch to the first stored reading, s (" + base.size() + " rounds)",
                "median (min..max)", "ratio to baseline");
        System.out.println("|" + "-".repeat(60) + "|" + "-".repeat(24) + "|" + "-".repeat(20) + "|");
        for (Map.Entry<String, List<Double>> e : seconds.entrySet()) {
            List<Double> s = e.getValue();
            double[] ratios = new double[s.size()];
            for (int i = 0; i < s.size(); i++) ratios[i] = s.get(i) / base.get(i);
            System.out.printf(Locale.ROOT, "| %-58s | %-22s | %-18s |%n", e.getKey(), stats(s.stream().mapToDouble(Double::doubleValue).toArray(), "%.2f"),
                    e.getKey().equals(baseline) ? "1" : stats(ratios, "%.2f"));
        }
    }

    static String stats(double[] v, String fmt) {
        double[] s = v.clone();
        Arrays.sort(s);
        double median = s.length % 2 == 1 ? s[s.length / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
        return String.format(Locale.ROOT, fmt + " (" + fmt + ".." + fmt + ")", median, s[0], s[s.length - 1]);
    }

    /** Readings of every sensor over the past {@code days}, one each {@code every}, through byre's own writer. */
    static long seed(Path db, int days, Duration every) {
        Instant now = Instant.now();
        Clock clock = Clock.fixed(now, ZoneOffset.UTC);
        long t0 = now.minus(Duration.ofDays(days)).toEpochMilli();
        long steps = Duration.ofDays(days).toMillis() / every.toMillis();
        try (HistoryStore store = HistoryStore.open(db, clock)) {
            try (HistoryWriter w = HistoryWriter.start(store, Retention.DEFAULT, clock)) {
                for (long i = 0; i < steps; i++) {
                    for (int s = 0; s < SENSORS; s++) {
                        w.appendWaiting(StreamKey.sensor(LoadConfig.sensorId(s, SENSORS)), t0 + i * every.toMillis() + s, 15.0 + (i % 97) / 10.0, null);
                    }
                }
                w.flush(Duration.ofMinutes(10));
            }
            store.checkpoint();
        }
        return steps * SENSORS;
    }
}
