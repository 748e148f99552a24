package byre.bench;

import byre.config.ByreConfig;
import byre.daemon.Daemon;
import byre.daemon.Pipeline;
import byre.rules.ZoneReading;
import byre.testing.Configs;
import byre.testing.Mosquitto;
import byre.zones.ClimateDeriver;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.lang.management.ManagementFactory;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;
import java.util.concurrent.atomic.AtomicLong;
import java.util.concurrent.atomic.LongAdder;
import org.eclipse.paho.client.mqttv3.MqttAsyncClient;
import org.eclipse.paho.client.mqttv3.MqttClient;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.MqttMessage;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;

/**
 * Many sites into one central byre: a generator imitates N sites (10 zones, 13 streams each, one value per stream
 * a minute, plus an alert event per site every 10 minutes) publishing into one mosquitto on loopback, at the real
 * rate (N x 130 messages a minute). For each N, first a bare Paho subscriber that only counts, then a central byre
 * (in this JVM, history in a temporary folder) reads the same load for the same time. Printed per N: messages,
 * CPU of this process per phase (the generator's share is in both), resident memory after the phase, and the lag
 * from publication to the subscriber (bare) or to the rules (byre): median and maximum.
 *
 * <p>{@code java -cp daemon/target/test-classes:daemon/target/byre.jar byre.bench.CentralBench [seconds] [N,N,...]}
 * (defaults 60 and 100,1000,5000). Run it on a quiet machine; a loaded one measures its neighbours.
 */
public final class CentralBench {
    static final int ZONES = 10;
    static final String[] STREAMS = {"dry-bulb", "wet-bulb", "rh", "dew-point", "air-speed", "humidity-ratio", "enthalpy",
            "vpd", "thi", "heat-index", "wind-chill", "cci", "pressure"};

    public static void main(String[] args) throws Exception {
        int seconds = args.length > 0 ? Integer.parseInt(args[0]) : 60;
        int[] sizes = args.length > 1 ? Arrays.stream(args[1].split(",")).mapToInt(Integer::parseInt).toArray() : new int[] {100, 1000, 5000};
        System.out.printf(Locale.ROOT, "%-6s %-6s %10s %9s %9s %10s %10s%n", "sites", "reader", "messages", "cpu s", "rss MB",
                "lag p50 ms", "lag max ms");
        for (int n : sizes) {
            try (Mosquitto broker = Mosquitto.start()) {
                Phase bare = bare(broker.uri(), n, seconds);
                print(n, "bare", bare);
                Phase byre = central(broker.uri(), n, seconds);
                print(n, "byre", byre);
                System.out.printf(Locale.ROOT, "       byre/bare cpu %.2f%n", byre.cpuS / Math.max(1e-9, bare.cpuS));
            }
        }
    }

    record Phase(long messages, double cpuS, long rssKb, long lagP50Ms, long lagMaxMs) {}

    static void print(int n, String who, Phase p) {
        System.out.printf(Locale.ROOT, "%-6d %-6s %10d %9.1f %9.0f %10d %10d%n", n, who, p.messages, p.cpuS, p.rssKb / 1024.0,
                p.lagP50Ms, p.lagMaxMs);
    }

    /** Lags in ms, a fixed-size histogram (0..60 s by ms). */
    static final class Lags {
        final LongAdder[] counts = new LongAdder[60_001];
        final AtomicLong max = new AtomicLong();
        final LongAdder n = new LongAdder();

        Lags() {
            for (int i = 0; i < counts.length; i++) counts[i] = new LongAdder();
        }

        void add(long ms) {
            counts[(int) Math.max(0, Math.min(ms, 60_000))].increment();
            max.accumulateAndGet(ms, Math::max);
            n.increment();
        }

        long p50() {
            long half = n.sum() / 2, seen = 0;
            for (int i = 0; i < counts.length; i++) if ((seen += counts[i].sum()) > half) return i;
            return 0;
        }
    }

    static Phase bare(String uri, int sites, int seconds) throws Exception {
        Lags lags = new Lags();
        MqttClient c = new MqttClient(uri, "bench-central-bare", new MemoryPersistence());
        MqttConnectOptions o = new MqttConnectOptions();
        o.setMaxInflight(1000);
        c.connect(o);
        c.subscribe(new String[] {"byre/+/zones/#", "byre/+/events"}, new int[] {1, 1}, new org.eclipse.paho.client.mqttv3.IMqttMessageListener[] {
            (t, m) -> lags.add(System.currentTimeMillis() - atMillis(m.getPayload())),
            (t, m) -> lags.add(System.currentTimeMillis() - atMillis(m.getPayload()))});
        Phase p = drive(uri, sites, seconds, lags);
        c.disconnect();
        c.close();
        return p;
    }

    static Phase central(String uri, int sites, int seconds) throws Exception {
        Path dir = Files.createTempDirectory("byre-central-bench");
        try {
            StringBuilder y = new StringBuilder("site: hub\nmqtt: { broker: " + uri + ", client-id: byre-bench-hub }\ncentral:\n  sites:\n");
            for (int s = 0; s < sites; s++) {
                y.append("    site").append(s).append(": { zones: [");
                for (int z = 0; z < ZONES; z++) y.append(z == 0 ? "" : ", ").append("zone").append(z);
                y.append("], groups: [dairy] }\n");
            }
            y.append("notify:\n  office: { type: command, argv: [/bin/true] }\nrules: rules.d\nhistory: { path: central.db }\n");
            Files.createDirectories(dir.resolve("rules.d"));
            Files.writeString(dir.resolve("rules.d/sites.rules"), "watch site-down\n  raise when @sites.online == 0 for 10m\n"
                    + "  clear when @sites.online == 1 for 2m\n  notify office\nwatch dairy-heat\n  raise when @dairy.thi >= 99\n"
                    + "  clear when @dairy.thi <= 98\n  notify office\n");
            ByreConfig cfg = Configs.parse("central.yaml", y.toString(), dir, k -> null);
            Lags lags = new Lags();
            Pipeline.ZoneListener onRules = r -> lags.add(System.currentTimeMillis() - r.at().toEpochMilli());
            try (Daemon d = Daemon.create(cfg, Clock.systemUTC(), new SimpleMeterRegistry()).listen(onRules).start(new ClimateDeriver())) {
                long deadline = System.nanoTime() + 30_000_000_000L;
                while (!d.link().isConnected() && System.nanoTime() < deadline) Thread.sleep(50);
                return drive(uri, sites, seconds, lags);
            }
        } finally {
            try (var walk = Files.walk(dir)) {
                walk.sorted(java.util.Comparator.reverseOrder()).forEach(f -> f.toFile().delete());
            }
        }
    }

    /** Publishes the sites' minute for {@code seconds}, spread evenly, then waits up to 30 s for the reader to catch up. */
    static Phase drive(String uri, int sites, int seconds, Lags lags) throws Exception {
        var os = (com.sun.management.OperatingSystemMXBean) ManagementFactory.getOperatingSystemMXBean();
        long cpu0 = os.getProcessCpuTime();
        MqttAsyncClient gen = new MqttAsyncClient(uri, "bench-central-gen", new MemoryPersistence());
        MqttConnectOptions o = new MqttConnectOptions();
        o.setMaxInflight(65_000);
        gen.connect(o).waitForCompletion();
        long perMinute = (long) sites * ZONES * STREAMS.length;
        long total = perMinute * seconds / 60;
        long start = System.nanoTime();
        long sent = 0;
        List<String> topics = new ArrayList<>();
        for (int z = 0; z < ZONES; z++) for (String q : STREAMS) topics.add("/zones/zone" + z + "/" + q);
        while (sent < total) {
            long due = Math.min(total, (System.nanoTime() - start) * perMinute / 60_000_000_000L);
            for (; sent < due; sent++) {
                int site = (int) (sent / topics.size() % sites);
                String topic = "byre/site" + site + topics.get((int) (sent % topics.size()));
                String at = Instant.now().toString();
                double value = topic.endsWith("/pressure") ? 98 + sent % 3 : 5 + sent % 10; // plausible for every stream
                String body = "{\"value\":" + value + ",\"unit\":\"\",\"at\":\"" + at + "\"}";
                publish(gen, topic, body);
                if (sent % (ZONES * STREAMS.length * 10) == 0) {
                    publish(gen, "byre/site" + site + "/events", "{\"id\":\"e" + sent + "\",\"incident\":\"i" + sent
                            + "\",\"event\":\"test\",\"site\":\"site" + site + "\",\"at\":\"" + at + "\"}");
                }
            }
            Thread.sleep(5);
        }
        long deadline = System.nanoTime() + 30_000_000_000L;
        while (lags.n.sum() < sent && System.nanoTime() < deadline) Thread.sleep(50);
        gen.disconnect().waitForCompletion();
        gen.close();
        return new Phase(lags.n.sum(), (os.getProcessCpuTime() - cpu0) / 1e9, rssKb(), lags.p50(), lags.max.get());
    }

    static void publish(MqttAsyncClient c, String topic, String body) throws Exception {
        MqttMessage m = new MqttMessage(body.getBytes(StandardCharsets.UTF_8));
        m.setQos(1);
        while (true) {
            try {
                c.publish(topic, m);
                return;
            } catch (org.eclipse.paho.client.mqttv3.MqttException e) {
                if (e.getReasonCode() != org.eclipse.paho.client.mqttv3.MqttException.REASON_CODE_MAX_INFLIGHT) throw e;
                Thread.sleep(1);
            }
        }
    }

    static long atMillis(byte[] payload) {
        String s = new String(payload, StandardCharsets.UTF_8);
        int i = s.indexOf("\"at\":\"");
        return i < 0 ? System.currentTimeMillis() : Instant.parse(s.substring(i + 6, s.indexOf('"', i + 6))).toEpochMilli();
    }

    static long rssKb() throws Exception {
        for (String l : Files.readAllLines(Path.of("/proc/self/status"))) {
            if (l.startsWith("VmRSS:")) return Long.parseLong(l.replaceAll("\\D", ""));
        }
        return 0;
    }
}
