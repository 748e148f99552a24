package byre.bench;

import byre.demo.LoadConfig;
import byre.demo.LoadMain;
import byre.history.StoredReadings;
import byre.testing.ByreProcess;
import byre.testing.Mosquitto;
import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.ResultSet;
import java.sql.Statement;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;
import java.util.UUID;
import java.util.concurrent.atomic.AtomicLong;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.eclipse.paho.client.mqttv3.MqttClient;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;

/**
 * End-to-end ingest benchmark (a main, not a test), one command, one table:
 * Debian mosquitto on loopback (unbounded queues, so QoS 1 loses nothing to a slow subscriber), the demo-feed
 * load generator publishing small JSON readings for 200 sensors in 50 zones flat out, and, one at a time in each
 * round: (a) the baseline, a bare Paho subscriber that only counts ({@link BareSubscriber}), as its own JVM with
 * byre's JVM options; (b) the same bare subscriber inside this benchmark JVM (default JIT with C2, a 512 MB heap),
 * reported beside it; (c) byre as its own JVM with the service's options (read from the systemd unit:
 * {@code -Xmx64m -XX:+UseSerialGC -XX:TieredStopAtLevel=1 ...}) storing every reading in its history. Each round
 * starts a fresh baseline process and a fresh byre, and both get the same warm-up load before they are measured.
 * The three use different topic prefixes, so each has the broker to itself. Rates are measured from the
 * publisher's start: a subscriber's last arrival, and byre's history holding all but the last batch (10,000 rows)
 * of the run's readings.
 * Also: byre's start-up (launch to connected; launch to the first committed row), resident memory, heap after a
 * full GC, database bytes per reading, and the zone derivation rate ({@link DerivationBench}).
 * byre's configuration holds 50 watches, one per zone on the derived THI with hold times and hysteresis, notifying a
 * webhook channel that posts to a local HTTP server ({@link BenchRules}, {@link HookSink}). Then, as separate phases:
 * alert latency p50/p99 under background load ({@link AlertLatencyBench}), a normal sensor's latency while another
 * floods ({@link FloodBench}) and replay throughput ({@link ReplayBench}).
 *
 * <p>Run: {@code daemon/src/test/bench/run.sh} (builds, then runs this main; options: --rounds N --count0 N --count1 N --warmup N
 * --watches N, where 0 runs the ingest rounds without watches for comparison; --ingest-only true skips the later phases).
 */
public final class IngestBench {
    static final int SENSORS = 200;
    static final int ZONES = 50;
    static final int BATCH_ROWS = byre.history.WriterSettings.DEFAULT.batchRows();

    /** One QoS level of one round: the baseline process, the in-process subscriber and byre. */
    record Round(double bareRate, long bareGot, double inJvmRate, double byreRate, long byreRows, long published) {}

    public static void main(String[] args) throws Exception {
        int rounds = 3;
        long count0 = 200_000, count1 = 100_000, warmup = 100_000;
        int watches = ZONES;
        boolean ingestOnly = false;
        for (int i = 0; i + 1 < args.length; i += 2) {
            switch (args[i]) {
                case "--rounds": rounds = Integer.parseInt(args[i + 1]); break;
                case "--count0": count0 = Long.parseLong(args[i + 1]); break;
                case "--count1": count1 = Long.parseLong(args[i + 1]); break;
                case "--warmup": warmup = Long.parseLong(args[i + 1]); break; // readings each side gets before it is measured
                case "--watches": watches = Integer.parseInt(args[i + 1]); break; // 0: ingest without watches, to compare
                case "--ingest-only": ingestOnly = Boolean.parseBoolean(args[i + 1]); break; // true: skip the later phases
                default: throw new IllegalArgumentException("unknown option " + args[i]);
            }
        }
        Path work = Files.createTempDirectory("byre-bench");
        Path db = work.resolve("history.db");
        Path config = work.resolve("byre.yaml");
        BenchRules.write(work.resolve("rules.d"), watches, false);
        List<String[]> table = new ArrayList<>();
        try (Mosquitto m = Mosquitto.start(); HookSink sink = new HookSink()) {
            Files.writeString(config, BenchRules.config(
                    LoadConfig.yaml(SENSORS, ZONES, m.uri(), null, "load", work.resolve("rules.d"), db), sink, false));
            // A retained reading waits for byre: start-up is measured to the moment it is stored.
            try (MqttClient c = client(m.uri(), "bench-retained")) {
                c.publish(LoadConfig.topic("load", 0, SENSORS, ZONES),
                        LoadConfig.payload(0, 0, System.currentTimeMillis() - 10_000, ZONES).getBytes(StandardCharsets.UTF_8), 1, true);
                c.disconnect();
            }
            // -Dbyre.bench.jvm="-XX:StartFlightRecording=filename=/tmp/byre.jfr" profiles byre during the run
            String extra = System.getProperty("byre.bench.jvm", "").trim();
            ByreProcess byre0 = ByreProcess.launch(config, extra.isEmpty() ? List.of() : List.of(extra.split("\\s+")));
            ByreProcess byre = byre0;
            try {
                long connectedMs = -1, firstRowMs = -1;
                long deadline = System.nanoTime() + Duration.ofSeconds(30).toNanos();
                while (System.nanoTime() < deadline && (connectedMs < 0 || firstRowMs < 0)) {
                    if (connectedMs < 0 && byre.log().contains("connected to MQTT broker")) connectedMs = sinceLaunch(byre);
                    if (firstRowMs < 0 && Files.exists(db) && sensorRows(db) > 0) firstRowMs = sinceLaunch(byre);
                    Thread.sleep(10);
                }
                Thread.sleep(2000);
                if (byre.log().contains("rule files have")) throw new IllegalStateException("the benchmark's rules do not load:\n" + byre.log());
                long idleRssKb = byre.procStatusKb("VmRSS");

                Round[] q0 = new Round[rounds], q1 = new Round[rounds];
                for (int r = 0; r < rounds; r++) {
                    if (r > 0) {
                        // A fresh byre per round: 200 sensors flat out send far more than the flood gate's 50 readings/s
                        // per sensor, which is lifted only for 30 s after a connection (a session backlog is no flood).
                        byre.stop(30);
                        byre = ByreProcess.launch(config, extra.isEmpty() ? List.of() : List.of(extra.split("\\s+")));
                        ByreProcess b = byre;
                        long until = System.nanoTime() + Duration.ofSeconds(30).toNanos();
                        while (!b.log().contains("connected to MQTT broker") && System.nanoTime() < until) Thread.sleep(10);
                    }
                    // Sustained rates are those of warm JVMs: the baseline process and byre get the same warm-up load
                    // (not measured) before their rounds; the in-process subscriber warms up in the first round.
                    try (BareSubscriber.Peer peer = new BareSubscriber.Peer(m.uri(), "bare", ByreProcess.SERVICE_JVM_OPTIONS)) {
                        if (warmup > 0) {
                            peer(peer, m, 0, warmup);
                            byreRound(m, db, 0, warmup);
                            if (r == 0) inJvm(m, 0, warmup);
                        }
                        q0[r] = round(m, db, peer, 0, count0);
                        q1[r] = round(m, db, peer, 1, count1);
                    }
                    System.out.printf(Locale.ROOT, "round %d: QoS 0 bare %.0f/s (in-JVM %.0f/s) byre %.0f/s (%d/%d rows); "
                            + "QoS 1 bare %.0f/s (in-JVM %.0f/s) byre %.0f/s (%d/%d rows)%n",
                            r + 1, q0[r].bareRate, q0[r].inJvmRate, q0[r].byreRate, q0[r].byreRows, q0[r].published,
                            q1[r].bareRate, q1[r].inJvmRate, q1[r].byreRate, q1[r].byreRows, q1[r].published);
                }
                long rssKb = byre.procStatusKb("VmRSS");
                long hwmKb = byre.procStatusKb("VmHWM");
                long heapKb = heapAfterGcKb(byre.pid());
                long rows = sensorRows(db);
                int code = byre.stop(30);
                // After the clean stop: the last connection has checkpointed the write-ahead log (up to 16 MiB while running).
                long bytes = Files.size(db) + (Files.exists(Path.of(db + "-wal")) ? Files.size(Path.of(db + "-wal")) : 0);

                addRate(table, "ingest QoS 0, msgs/s (byre vs bare Paho subscriber, same JVM options)", q0, Round::bareRate);
                addRate(table, "ingest QoS 1, msgs/s (byre vs bare Paho subscriber, same JVM options)", q1, Round::bareRate);
                addRate(table, "ingest QoS 0, msgs/s (byre vs bare subscriber inside the benchmark JVM, C2 JIT)", q0, Round::inJvmRate);
                addRate(table, "ingest QoS 1, msgs/s (byre vs bare subscriber inside the benchmark JVM, C2 JIT)", q1, Round::inJvmRate);
                long lost1 = Arrays.stream(q1).mapToLong(x -> x.published - x.byreRows).sum();
                long lost0 = Arrays.stream(q0).mapToLong(x -> x.published - x.byreRows).sum();
                long bareLost0 = Arrays.stream(q0).mapToLong(x -> x.published - x.bareGot).sum();
                table.add(row("QoS 1 readings lost (all rounds, history flushed)", Long.toString(lost1), "0", ""));
                table.add(row("QoS 0 readings not stored (all rounds)", Long.toString(lost0), Long.toString(bareLost0) + " (bare)", ""));
                table.add(row("start-up: launch -> connected, ms", Long.toString(connectedMs), "~1050 (platform notes)", ""));
                table.add(row("start-up: launch -> first row committed, ms", Long.toString(firstRowMs), "", "the first batch commits at once"));
                table.add(row("resident memory idle / after bursts / peak, MB", String.format(Locale.ROOT, "%.1f / %.1f / %.1f",
                        idleRssKb / 1000.0, rssKb / 1000.0, hwmKb / 1000.0), "82.5 / 101.7 (platform notes)", ""));
                table.add(row("heap used after full GC, MB", String.format(Locale.ROOT, "%.1f", heapKb / 1000.0), "", ""));
                table.add(row("database bytes per reading (raw + zone rows + rollups)", String.format(Locale.ROOT, "%.1f", (double) bytes / rows),
                        "24.6 (bare WITHOUT ROWID, platform notes)", String.format(Locale.ROOT, "%.2f", bytes / (double) rows / 24.6)));
                table.add(row("byre exit code on SIGTERM", Integer.toString(code), "143 = clean JVM exit", ""));
                table.add(row("webhook requests from the " + watches + " THI watches during the ingest rounds",
                        Long.toString(sink.requests.get()), "", "readings span ~1 s of reading time per round"));
            } finally {
                if (byre.isAlive()) byre.kill9();
            }
            if (!ingestOnly) {
                System.out.println("alert latency phase ...");
                AlertLatencyBench.rows(AlertLatencyBench.run(m, AlertLatencyBench.DEFAULT_CYCLES,
                        AlertLatencyBench.DEFAULT_WARMUP, Duration.ofSeconds(60)), table);
            }
        }
        if (!ingestOnly) {
            System.out.println("flood phase ...");
            FloodBench.rows(table);
        }
        if (!ingestOnly) {
            derivation(table);
            System.out.println("replay phase ...");
            ReplayBench.rows(table, 1_000_000);
        }
        print(table);
        try (var walk = Files.walk(work)) {
            walk.sorted(java.util.Comparator.reverseOrder()).forEach(f -> f.toFile().delete());
        }
    }

    private static long sinceLaunch(ByreProcess p) {
        return (System.nanoTime() - p.launchedNanos()) / 1_000_000;
    }

    /** One QoS level: the baseline process alone, the in-process subscriber alone, then byre alone, each with the same load. */
    static Round round(Mosquitto m, Path db, BareSubscriber.Peer peer, int qos, long count) throws Exception {
        double[] bare = peer(peer, m, qos, count);
        double[] inJvm = inJvm(m, qos, count);
        double[] byre = byreRound(m, db, qos, count);
        return new Round(bare[0], (long) bare[1], inJvm[0], byre[0], (long) byre[1], count);
    }

    /** The baseline process (its own JVM with byre's options) on the prefix {@code bare}: {rate, messages received}. */
    static double[] peer(BareSubscriber.Peer peer, Mosquitto m, int qos, long count) throws Exception {
        long before = peer.got();
        long t0 = System.nanoTime();
        publish(m, "bare", qos, count);
        awaitCount(peer::got, before + count, qos);
        long got = peer.got() - before;
        return new double[] {got / ((peer.lastNanos() - t0) / 1e9), got};
    }

    /** A bare Paho subscriber inside this JVM (default JIT, this JVM's heap) on its own prefix: {rate, messages received}. */
    static double[] inJvm(Mosquitto m, int qos, long count) throws Exception {
        AtomicLong got = new AtomicLong();
        long[] lastNanos = {0};
        MqttClient bare = client(m.uri(), "bench-in-jvm");
        bare.subscribe("injvm/#", qos, (t, msg) -> {
            got.incrementAndGet();
            lastNanos[0] = System.nanoTime();
        });
        long t0 = System.nanoTime();
        publish(m, "injvm", qos, count);
        awaitCount(got::get, count, qos);
        bare.disconnect();
        bare.close();
        return new double[] {got.get() / ((lastNanos[0] - t0) / 1e9), got.get()};
    }

    /** Waits (at most 30 s) for a subscriber's count to reach {@code target}; at QoS 0 also until it stops moving. */
    static void awaitCount(java.util.function.LongSupplier count, long target, int qos) throws InterruptedException {
        long waitUntil = System.nanoTime() + Duration.ofSeconds(30).toNanos();
        while (count.getAsLong() < target && System.nanoTime() < waitUntil) {
            long seen = count.getAsLong();
            Thread.sleep(500);
            if (qos == 0 && count.getAsLong() == seen) break; // QoS 0: what is lost stays lost
        }
    }

    /** byre, on the prefix its configuration subscribes to: {rate, rows stored}. */
    static double[] byreRound(Mosquitto m, Path db, int qos, long count) throws Exception {
        long before = sensorRows(db);
        long target = before + count - BATCH_ROWS;
        long t1 = System.nanoTime();
        Thread publisher = new Thread(() -> {
            try {
                publish(m, "load", qos, count);
            } catch (Exception e) {
                throw new RuntimeException(e);
            }
        });
        publisher.start();
        long reachedNanos = -1;
        long rows = before, lastChange = System.nanoTime();
        long end = System.nanoTime() + Duration.ofSeconds(120).toNanos();
        while (System.nanoTime() < end) {
            Thread.sleep(100);
            long now = sensorRows(db);
            if (now != rows) {
                rows = now;
                lastChange = System.nanoTime();
            }
            if (reachedNanos < 0 && rows >= target) reachedNanos = System.nanoTime();
            if (rows >= before + count || (!publisher.isAlive() && System.nanoTime() - lastChange > 3_000_000_000L)) break;
        }
        publisher.join();
        double byreRate = reachedNanos < 0 ? (rows - before) / ((lastChange - t1) / 1e9) : (target - before) / ((reachedNanos - t1) / 1e9);
        return new double[] {byreRate, rows - before};
    }

    static void publish(Mosquitto m, String prefix, int qos, long count) throws Exception {
        LoadMain.Options o = LoadMain.Options.parse("--broker", m.uri(), "--sensors", Integer.toString(SENSORS), "--zones",
                Integer.toString(ZONES), "--qos", Integer.toString(qos), "--count", Long.toString(count), "--duration", "1h",
                "--topic-prefix", prefix, "--client-id", "bench-load-" + UUID.randomUUID().toString().substring(0, 8));
        LoadMain.run(o, new PrintStream(new ByteArrayOutputStream(), true, StandardCharsets.UTF_8));
    }

    static MqttClient client(String uri, String name) throws Exception {
        MqttClient c = new MqttClient(uri, name + "-" + UUID.randomUUID().toString().substring(0, 8), new MemoryPersistence());
        MqttConnectOptions o = new MqttConnectOptions();
        o.setCleanSession(true);
        o.setMaxInflight(1000);
        c.connect(o);
        return c;
    }

    static long sensorRows(Path db) throws Exception {
        try {
            return StoredReadings.count(db, r -> r.kind().equals("sensor"));
        } catch (AssertionError e) {
            return 0; // not created yet
        }
    }

    /** Heap in use after a full collection, from {@code jcmd GC.run} and {@code GC.heap_info}, in kB. */
    static long heapAfterGcKb(long pid) throws Exception {
        String jcmd = Path.of(System.getProperty("java.home"), "bin", "jcmd").toString();
        new ProcessBuilder(jcmd, Long.toString(pid), "GC.run").redirectErrorStream(true).start().waitFor();
        Process p = new ProcessBuilder(jcmd, Long.toString(pid), "GC.heap_info").redirectErrorStream(true).start();
        String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        p.waitFor();
        long used = 0;
        Matcher mm = Pattern.compile("(?m)^\\s*(def new generation|tenured generation)\\s+total \\d+K, used (\\d+)K").matcher(out);
        while (mm.find()) used += Long.parseLong(mm.group(2));
        return used == 0 ? -1 : used;
    }

    static void derivation(List<String[]> table) {
        PrintStream saved = System.out;
        ByteArrayOutputStream buf = new ByteArrayOutputStream();
        System.setOut(new PrintStream(buf, true, StandardCharsets.UTF_8));
        try {
            DerivationBench.main(new String[0]);
        } finally {
            System.setOut(saved);
        }
        String text = buf.toString(StandardCharsets.UTF_8);
        Matcher base = Pattern.compile("baseline Magnus e_w only\\s+([\\d,]+) /s").matcher(text);
        String baseline = base.find() ? base.group(1) + " Magnus e_w/s" : "?";
        Matcher d = Pattern.compile("(derive, [^\\n]*?)\\s+([\\d,]+) zones/s\\s+\\(cost = ([\\d.]+) x baseline\\)").matcher(text);
        while (d.find()) {
            table.add(row("zone derivations/s, " + d.group(1).substring(8).trim(), d.group(2), baseline, "cost " + d.group(3) + " x"));
        }
    }

    static void addRate(List<String[]> table, String what, Round[] rounds, java.util.function.ToDoubleFunction<Round> baseline) {
        double[] byre = Arrays.stream(rounds).mapToDouble(Round::byreRate).toArray();
        double[] bare = Arrays.stream(rounds).mapToDouble(baseline).toArray();
        double[] ratios = new double[rounds.length];
        for (int i = 0; i < rounds.length; i++) ratios[i] = byre[i] / bare[i];
        table.add(row(what, String.format(Locale.ROOT, "%,.0f (%,.0f..%,.0f)", median(byre), min(byre), max(byre)),
                String.format(Locale.ROOT, "%,.0f", median(bare)),
                String.format(Locale.ROOT, "%.2f (%.2f..%.2f)", median(ratios), min(ratios), max(ratios))));
    }

    static String[] row(String what, String byre, String baseline, String ratio) {
        return new String[] {what, byre, baseline, ratio};
    }

    static void print(List<String[]> table) {
        System.out.println();
        System.out.println("| measure | byre | baseline | ratio / note |");
        System.out.println("|---|---|---|---|");
        for (String[] r : table) System.out.println("| " + String.join(" | ", r) + " |");
    }

    static double median(double[] a) {
        double[] s = a.clone();
        Arrays.sort(s);
        return s.length % 2 == 1 ? s[s.length / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
    }

    static double min(double[] a) { return Arrays.stream(a).min().orElse(Double.NaN); }

    static double max(double[] a) { return Arrays.stream(a).max().orElse(Double.NaN); }
}
