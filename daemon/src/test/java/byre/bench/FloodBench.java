package byre.bench;

import byre.config.ByreConfig;
import byre.daemon.Daemon;
import byre.daemon.Pipeline;
import byre.rules.ZoneReading;
import byre.testing.Configs;
import byre.testing.Mosquitto;
import byre.testing.TestPublisher;
import byre.units.Quantity;
import byre.zones.ClimateDeriver;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.UUID;
import java.util.concurrent.ConcurrentLinkedQueue;
import java.util.concurrent.atomic.AtomicLong;
import java.util.concurrent.locks.LockSupport;

/**
 * Latency of a normal sensor while another floods (a main, not a test): byre in this JVM on mosquitto, the cow
 * shed's dry bulb reporting every 100 ms (QoS 1) with its publication time in the payload, latency = arrival of the
 * zone reading at the pipeline minus that time. Baseline in the same run: the same for 3 s without the flood; then
 * 3 s with a pen sensor sending 10,000 readings a second (QoS 0). Prints p50 and max of both and their ratio. (The
 * flood gate's grace period after a connection is skipped by running byre's ticker 31 s ahead, not by waiting.)
 */
public final class FloodBench {
    static final int FLOOD_PER_SECOND = 10_000;
    static final Duration PHASE = Duration.ofSeconds(3);

    public static void main(String[] args) throws Exception {
        List<String[]> table = new ArrayList<>();
        rows(table);
        IngestBench.print(table);
    }

    static void rows(List<String[]> table) throws Exception {
        Path work = Files.createTempDirectory("byre-flood-bench");
        ConcurrentLinkedQueue<Long> latencyMs = new ConcurrentLinkedQueue<>();
        AtomicLong shift = new AtomicLong();
        try (Mosquitto m = Mosquitto.start()) {
            String yaml = """
                    site: larkmoor
                    timezone: Europe/London
                    mqtt: { broker: %s, client-id: byre-flood-bench-%s }
                    sensors:
                      pen1-dry: { topic: larkmoor/calf-barn/pen1/dry, quantity: dry-bulb, payload: "json:v", time: "json:ts" }
                      shed-dry: { topic: larkmoor/cow-shed/dry, quantity: dry-bulb, payload: "json:v", time: "json:ts" }
                    zones:
                      calf-pen-1: { groups: [calves], sensors: [pen1-dry] }
                      cow-shed:   { groups: [cows], sensors: [shed-dry] }
                    history: { path: %s }
                    """.formatted(m.uri(), UUID.randomUUID().toString().substring(0, 8), work.resolve("history.db"));
            ByreConfig cfg = Configs.parse("flood.yaml", yaml, work, n -> null);
            try (Daemon d = Daemon.create(cfg, Clock.systemUTC(), () -> System.nanoTime() + shift.get(), new SimpleMeterRegistry())
                    .listen(new Pipeline.ZoneListener() {
                        @Override
                        public void accept(ZoneReading r) {
                            if (r.zone().equals("cow-shed") && r.quantity() == Quantity.DRY_BULB) {
                                latencyMs.add(System.currentTimeMillis() - r.at().toEpochMilli());
                            }
                        }
                    }).start(new ClimateDeriver());
                 TestPublisher shed = new TestPublisher(m.uri()); TestPublisher mad = new TestPublisher(m.uri())) {
                long until = System.nanoTime() + Duration.ofSeconds(15).toNanos();
                while (!d.link().isConnected() && System.nanoTime() < until) Thread.sleep(10);
                shift.set(Duration.ofSeconds(31).toNanos());
                double[] quiet = phase(shed, null, latencyMs);
                double[] flood = phase(shed, mad, latencyMs);
                table.add(IngestBench.row("cow-shed latency p50 during a 10,000/s flood from another sensor, ms",
                        String.format(Locale.ROOT, "%.0f", flood[0]), String.format(Locale.ROOT, "%.0f (no flood)", quiet[0]),
                        String.format(Locale.ROOT, "%.2f", flood[0] / Math.max(1, quiet[0]))));
                table.add(IngestBench.row("cow-shed latency max during the flood, ms", String.format(Locale.ROOT, "%.0f", flood[1]),
                        String.format(Locale.ROOT, "%.0f (no flood)", quiet[1]),
                        String.format(Locale.ROOT, "%.2f; %.0f shed readings", flood[1] / Math.max(1, quiet[1]), flood[2])));
            }
        } finally {
            try (var walk = Files.walk(work)) {
                walk.sorted(java.util.Comparator.reverseOrder()).forEach(f -> f.toFile().delete());
            }
        }
    }

    /** One phase: the shed every 100 ms, with the flood when {@code mad} is given; returns p50, max, count. */
    private static double[] phase(TestPublisher shed, TestPublisher mad, ConcurrentLinkedQueue<Long> latencyMs) throws Exception {
        Thread.sleep(500);
        latencyMs.clear();
        long start = System.nanoTime();
        long startMs = System.currentTimeMillis();
        long sent = 0;
        long shedN = 0;
        long nextShed = start;
        while (System.nanoTime() - start < PHASE.toNanos()) {
            if (mad != null) {
                long due = start + sent * 1_000_000_000L / FLOOD_PER_SECOND;
                long now = System.nanoTime();
                if (now < due) LockSupport.parkNanos(due - now);
                mad.publish("larkmoor/calf-barn/pen1/dry", "{\"v\":18.5,\"ts\":" + (startMs - 60_000 + sent) + "}", 0, false);
                sent++;
            } else {
                LockSupport.parkNanos(1_000_000);
            }
            if (System.nanoTime() >= nextShed) {
                shed.publish("larkmoor/cow-shed/dry", String.format(Locale.ROOT, "{\"v\":%.2f,\"ts\":%d}", 22 + (shedN++ % 10) / 10.0,
                        System.currentTimeMillis()));
                nextShed += 100_000_000L;
            }
        }
        Thread.sleep(1000);
        double[] lat = latencyMs.stream().mapToDouble(Long::doubleValue).sorted().toArray();
        if (lat.length == 0) return new double[] {Double.NaN, Double.NaN, 0};
        return new double[] {lat[lat.length / 2], lat[lat.length - 1], lat.length};
    }
}
