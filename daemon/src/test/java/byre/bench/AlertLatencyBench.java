package byre.bench;

import byre.demo.LoadConfig;
import byre.testing.ByreProcess;
import byre.testing.Mosquitto;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;
import java.util.concurrent.BlockingQueue;
import java.util.concurrent.LinkedBlockingQueue;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicBoolean;
import org.eclipse.paho.client.mqttv3.MqttClient;
import org.eclipse.paho.client.mqttv3.MqttMessage;

/**
 * Alert latency (a main, not a test): byre as its own JVM with the service's heap options, 50 THI watches plus one
 * probe watch without a hold time ({@code raise when z51.dry-bulb > 40 C}, {@code clear when z51.dry-bulb < 38 C}),
 * background load of 200 sensors at one reading a second each. Each cycle publishes a probe reading of 45 C (QoS 1),
 * waits for the {@code raised} webhook request at a local HTTP server, then 20 C and the {@code cleared} request;
 * the latency is publish to request arrival. Baseline, interleaved in the same cycles on the same broker: a bare
 * Paho publish (QoS 1) to a Paho subscriber. Bounded by cycle count and time.
 *
 * <p>The first {@code --warmup} cycles (default {@value #DEFAULT_WARMUP}) are the first window after start: byre's JVM
 * is a few seconds old, still compiling and collecting its start-up objects. They are reported on their own row, and
 * the {@code --cycles} after them (default {@value #DEFAULT_CYCLES}) as the steady state a barn lives in. The probe
 * channel's rate limit is raised for the bench ({@link BenchRules#PROBE_RATE_LIMIT}) so that more cycles fit.
 *
 * <p>{@code --background R} sets the background load to R readings a second in all (default 200, one a second per
 * sensor): above a few thousand the history writer commits full batches back to back, as in a burst.
 *
 * <p>Usage: {@code AlertLatencyBench [--cycles N] [--warmup N] [--seconds S] [--background R]} (a bare number is
 * {@code --cycles}).
 */
public final class AlertLatencyBench {
    static final int SENSORS = 200;
    static final int ZONES = 50;
    /** Past the young collections of the first second or two after start (at about 20 ms a cycle). */
    static final int DEFAULT_WARMUP = 100;
    static final int DEFAULT_CYCLES = 1000;
    /** Background load before the first probe: zones derived, watches live. */
    static final Duration SETTLE = Duration.ofSeconds(3);

    /**
     * Steady-state samples ({@code alertMs}, {@code bareMs}) and the first window's ({@code firstAlertMs}), which
     * ran from {@code firstFromS} to {@code firstToS} seconds after byre's JVM was launched.
     */
    record Result(double[] alertMs, double[] bareMs, double[] firstAlertMs, double firstFromS, double firstToS,
                  long timeouts, long hookRequests) {}

    public static void main(String[] args) throws Exception {
        int cycles = DEFAULT_CYCLES, warmup = DEFAULT_WARMUP, seconds = 120, perS = SENSORS;
        for (int i = 0; i < args.length; i++) {
            switch (args[i]) {
                case "--cycles" -> cycles = Integer.parseInt(args[++i]);
                case "--warmup" -> warmup = Integer.parseInt(args[++i]);
                case "--seconds" -> seconds = Integer.parseInt(args[++i]);
                case "--background" -> perS = Integer.parseInt(args[++i]);
                default -> cycles = Integer.parseInt(args[i]);
            }
        }
        try (Mosquitto m = Mosquitto.start()) {
            List<String[]> table = new ArrayList<>();
            rows(run(m, cycles, warmup, Duration.ofSeconds(seconds), perS), table);
            IngestBench.print(table);
        }
    }

    static Result run(Mosquitto m, int cycles, int warmup, Duration bound) throws Exception {
        return run(m, cycles, warmup, bound, SENSORS);
    }

    /** As above with {@code backgroundPerS} background readings a second. */
    static Result run(Mosquitto m, int cycles, int warmup, Duration bound, int backgroundPerS) throws Exception {
        Path work = Files.createTempDirectory("byre-latency");
        Path rules = work.resolve("rules.d");
        BenchRules.write(rules, ZONES, true);
        Path config = work.resolve("byre.yaml");
        try (HookSink sink = new HookSink()) {
            Files.writeString(config, BenchRules.config(
                    LoadConfig.yaml(SENSORS, ZONES, m.uri(), null, "bg", rules, work.resolve("history.db")), sink, true));
            ByreProcess byre = ByreProcess.launch(config, List.of());
            AtomicBoolean stop = new AtomicBoolean();
            Thread background = new Thread(() -> background(m, stop, backgroundPerS), "bench-background");
            try {
                long until = System.nanoTime() + Duration.ofSeconds(30).toNanos();
                while (!byre.log().contains("connected to MQTT broker") && System.nanoTime() < until) Thread.sleep(10);
                if (!byre.log().contains("connected to MQTT broker")) throw new IllegalStateException("byre did not connect:\n" + byre.log());
                background.start();
                Thread.sleep(SETTLE.toMillis()); // background load running, zones derived, watches live

                BlockingQueue<Long> bareArrivals = new LinkedBlockingQueue<>();
                MqttClient bareSub = IngestBench.client(m.uri(), "bench-rtt-sub");
                bareSub.subscribe("rtt/#", 1, (t, msg) -> bareArrivals.add(System.nanoTime()));
                MqttClient pub = IngestBench.client(m.uri(), "bench-probe");
                List<Double> alert = new ArrayList<>(), bare = new ArrayList<>(), first = new ArrayList<>();
                long timeouts = 0, lastTs = 0;
                long firstFrom = System.nanoTime(), firstTo = firstFrom;
                long end = firstFrom + bound.toNanos();
                for (int i = 0; i < cycles + warmup && System.nanoTime() < end; i++) {
                    if (i == warmup) firstTo = System.nanoTime();
                    for (String[] step : new String[][] {{"45.00", "raised"}, {"20.00", "cleared"}}) {
                        // baseline: bare publish -> subscribe
                        long t = System.nanoTime();
                        pub.publish("rtt/probe", msg("{\"v\":1}"));
                        Long got = bareArrivals.poll(5, TimeUnit.SECONDS);
                        if (got != null && i >= warmup) bare.add((got - t) / 1e6);

                        long ts = Math.max(lastTs + 1, System.currentTimeMillis());
                        lastTs = ts;
                        sink.probes.clear();
                        long t0 = System.nanoTime();
                        pub.publish(BenchRules.PROBE_TOPIC, msg("{\"v\":" + step[0] + ",\"ts\":" + ts + "}"));
                        HookSink.Arrival a;
                        do {
                            a = sink.probes.poll(5, TimeUnit.SECONDS);
                        } while (a != null && !a.event().equals(step[1]));
                        if (a == null) {
                            timeouts++;
                        } else {
                            (i >= warmup ? alert : first).add((a.nanos() - t0) / 1e6);
                        }
                    }
                }
                pub.disconnect();
                bareSub.disconnect();
                stop.set(true);
                background.join(5000);
                byre.stop(30);
                if (firstTo == firstFrom) firstTo = System.nanoTime(); // the bound ended the run inside the first window
                return new Result(array(alert), array(bare), array(first), (firstFrom - byre.launchedNanos()) / 1e9,
                        (firstTo - byre.launchedNanos()) / 1e9, timeouts, sink.requests.get());
            } finally {
                stop.set(true);
                if (byre.isAlive()) byre.kill9();
                try (var walk = Files.walk(work)) {
                    walk.sorted(java.util.Comparator.reverseOrder()).forEach(f -> f.toFile().delete());
                }
            }
        }
    }

    /** 200 sensors in turn, {@code perS} readings a second in all, evenly spread (QoS 1, sensors' own topics). */
    static void background(Mosquitto m, AtomicBoolean stop, int perS) {
        try {
            MqttClient c = IngestBench.client(m.uri(), "bench-background");
            String[] topics = new String[SENSORS];
            for (int i = 0; i < SENSORS; i++) topics[i] = LoadConfig.topic("bg", i, SENSORS, ZONES);
            long start = System.nanoTime();
            for (long n = 0; !stop.get(); n++) {
                long due = start + n * 1_000_000_000L / perS;
                long now;
                while ((now = System.nanoTime()) < due) TimeUnit.NANOSECONDS.sleep(due - now);
                int i = (int) (n % SENSORS);
                c.publish(topics[i], msg(LoadConfig.payload(i, n / SENSORS, System.currentTimeMillis(), ZONES)));
            }
            c.disconnect();
            c.close();
        } catch (Exception e) {
            if (!stop.get()) throw new RuntimeException(e);
        }
    }

    private static double[] array(List<Double> l) {
        return l.stream().mapToDouble(Double::doubleValue).toArray();
    }

    static MqttMessage msg(String s) {
        MqttMessage mm = new MqttMessage(s.getBytes(StandardCharsets.UTF_8));
        mm.setQos(1);
        return mm;
    }

    static void rows(Result r, List<String[]> table) {
        double[] a = r.alertMs(), b = r.bareMs(), f = r.firstAlertMs();
        table.add(IngestBench.row("alert latency p50 / p95 / p99 / max, ms: publish -> webhook request (" + a.length
                        + " raise+clear after the first window, 200 sensors at 1/s behind)",
                String.format(Locale.ROOT, "%.1f / %.1f / %.1f / %.1f", pct(a, 50), pct(a, 95), pct(a, 99), pct(a, 100)),
                String.format(Locale.ROOT, "%.2f / %.2f / %.2f / %.2f (bare Paho publish -> subscribe)",
                        pct(b, 50), pct(b, 95), pct(b, 99), pct(b, 100)),
                String.format(Locale.ROOT, "%.0f x / %.0f x (p50 / p99); %d timeouts", pct(a, 50) / pct(b, 50),
                        pct(a, 99) / pct(b, 99), r.timeouts())));
        table.add(IngestBench.row(String.format(Locale.ROOT, "alert latency, first window: p50 / p99 / max / the first alert's,"
                        + " ms (%d raise+clear, %.1f..%.1f s after launch)", f.length, r.firstFromS(), r.firstToS()),
                String.format(Locale.ROOT, "%.1f / %.1f / %.1f / %.1f", pct(f, 50), pct(f, 99), pct(f, 100),
                        f.length == 0 ? Double.NaN : f[0]), "",
                "JVM young, start-up objects still collected"));
    }

    /** Nearest-rank percentile. */
    static double pct(double[] a, double p) {
        if (a.length == 0) return Double.NaN;
        double[] s = a.clone();
        Arrays.sort(s);
        int rank = (int) Math.ceil(p / 100.0 * s.length);
        return s[Math.max(0, Math.min(s.length - 1, rank - 1))];
    }
}
