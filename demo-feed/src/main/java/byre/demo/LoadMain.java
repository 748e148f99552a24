package byre.demo;

import java.io.IOException;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.Locale;
import java.util.concurrent.Semaphore;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicLong;
import java.util.concurrent.locks.LockSupport;
import org.eclipse.paho.client.mqttv3.IMqttActionListener;
import org.eclipse.paho.client.mqttv3.IMqttToken;
import org.eclipse.paho.client.mqttv3.MqttAsyncClient;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.MqttException;
import org.eclipse.paho.client.mqttv3.MqttMessage;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;

/**
 * Load generator for benchmarks: small JSON readings, round robin over M sensors in Z zones
 * (topics and payloads as in {@link LoadConfig}), paced to a total rate or flat out.
 *
 * <pre>
 * java -cp byre-demo-feed.jar:paho.jar byre.demo.LoadMain --broker tcp://127.0.0.1:1883 --rate 5000 \
 *      --sensors 300 --zones 100 --duration 30s --qos 1 [--topic-prefix load] [--client-id ID]
 *      [--count N] [--inflight 1000] [--write-config byre.yaml [--rules DIR] [--history FILE]]
 * </pre>
 *
 * With {@code --write-config} it writes the matching byre configuration and exits without publishing.
 */
public final class LoadMain {
    private static final String USAGE = "usage: LoadMain --broker tcp://127.0.0.1:1883 --rate N (msgs/s total, 0 = flat out)"
            + " --sensors M --zones Z --duration 30s --qos 0|1 [--topic-prefix load] [--client-id ID] [--count N]"
            + " [--inflight 1000] [--write-config FILE [--rules DIR] [--history FILE]]";

    /** Parsed command line. */
    public record Options(String broker, double rate, int sensors, int zones, Duration duration, int qos,
                          String topicPrefix, String clientId, long count, int inflight,
                          Path writeConfig, Path rules, Path history) {

        /** Defaults: 127.0.0.1:1883, flat out, 100 sensors in 10 zones, 30 s, QoS 1, prefix "load". */
        public static Options defaults() {
            return new Options("tcp://127.0.0.1:1883", 0, 100, 10, Duration.ofSeconds(30), 1, "load", null,
                    0, 1000, null, Path.of("rules.d"), Path.of("load-history.db"));
        }

        /** Parses flags; a bad flag or value gives an IllegalArgumentException naming it. */
        public static Options parse(String... args) {
            Options d = defaults();
            String broker = d.broker, topicPrefix = d.topicPrefix, clientId = d.clientId;
            double rate = d.rate;
            int sensors = d.sensors, zones = d.zones, qos = d.qos, inflight = d.inflight;
            long count = d.count;
            Duration duration = d.duration;
            Path writeConfig = d.writeConfig, rules = d.rules, history = d.history;
            for (int i = 0; i < args.length; i++) {
                String flag = args[i];
                if (i + 1 >= args.length) throw new IllegalArgumentException(flag + " needs a value");
                String v = args[++i];
                switch (flag) {
                    case "--broker": broker = v; break;
                    case "--rate": rate = number(flag, v); break;
                    case "--sensors": sensors = (int) whole(flag, v); break;
                    case "--zones": zones = (int) whole(flag, v); break;
                    case "--duration": duration = duration(v); break;
                    case "--qos": qos = qos(v); break;
                    case "--topic-prefix": topicPrefix = v; break;
                    case "--client-id": clientId = v; break;
                    case "--count": count = whole(flag, v); break;
                    case "--inflight": inflight = (int) whole(flag, v); break;
                    case "--write-config": writeConfig = Path.of(v); break;
                    case "--rules": rules = Path.of(v); break;
                    case "--history": history = Path.of(v); break;
                    default: throw new IllegalArgumentException("unknown option " + flag);
                }
            }
            LoadConfig.check(sensors, zones);
            if (inflight < 1) throw new IllegalArgumentException("--inflight must be at least 1");
            if (rate < 0) throw new IllegalArgumentException("--rate must be 0 (flat out) or more");
            return new Options(broker, rate, sensors, zones, duration, qos, topicPrefix, clientId, count, inflight,
                    writeConfig, rules, history);
        }

        private static double number(String flag, String v) {
            try {
                return Double.parseDouble(v);
            } catch (NumberFormatException e) {
                throw new IllegalArgumentException(flag + " needs a number, got '" + v + "'");
            }
        }

        private static long whole(String flag, String v) {
            try {
                long n = Long.parseLong(v);
                if (n < 0) throw new IllegalArgumentException(flag + " cannot be negative, got " + v);
                return n;
            } catch (NumberFormatException e) {
                throw new IllegalArgumentException(flag + " needs a whole number, got '" + v + "'");
            }
        }

        private static int qos(String v) {
            if (v.equals("0")) return 0;
            if (v.equals("1")) return 1;
            throw new IllegalArgumentException("--qos must be 0 or 1, got '" + v + "'");
        }

        /** {@code 30s 20m 2h 1d}, as in rule files, or plain seconds. */
        static Duration duration(String v) {
            java.util.regex.Matcher m = java.util.regex.Pattern.compile("(\\d+)([smhd]?)").matcher(v.trim());
            if (!m.matches()) throw new IllegalArgumentException("--duration must look like 30s, 20m, 2h or 1d, got '" + v + "'");
            long n = Long.parseLong(m.group(1));
            switch (m.group(2)) {
                case "m": return Duration.ofMinutes(n);
                case "h": return Duration.ofHours(n);
                case "d": return Duration.ofDays(n);
                default: return Duration.ofSeconds(n);
            }
        }
    }

    /** What a run did: messages handed to Paho, acknowledged (QoS 1) or written (QoS 0), failed. */
    public record Result(long sent, long completed, long failed, double seconds) {
        public double ratePerSecond() { return seconds > 0 ? completed / seconds : 0; }
    }

    private LoadMain() {}

    public static void main(String[] args) {
        Options o;
        try {
            o = Options.parse(args);
        } catch (IllegalArgumentException e) {
            System.err.println("LoadMain: " + e.getMessage());
            System.err.println(USAGE);
            System.exit(2);
            return;
        }
        try {
            if (o.writeConfig() != null) {
                Files.writeString(o.writeConfig(), LoadConfig.yaml(o.sensors(), o.zones(), o.broker(), null,
                        o.topicPrefix(), o.rules(), o.history()), StandardCharsets.UTF_8);
                System.out.println("wrote " + o.writeConfig());
                return;
            }
            Result r = run(o, System.out);
            System.exit(r.failed() == 0 ? 0 : 1);
        } catch (IOException e) {
            System.err.println("LoadMain: " + e.getMessage());
            System.exit(1);
        }
    }

    /** Publishes per {@code o}; prints one summary line to {@code out}. */
    public static Result run(Options o, PrintStream out) throws IOException {
        String clientId = o.clientId() != null ? o.clientId() : PahoSink.uniqueClientId("byre-load");
        MqttAsyncClient client;
        try {
            client = new MqttAsyncClient(o.broker(), clientId, new MemoryPersistence());
        } catch (MqttException | IllegalArgumentException e) {
            throw new IOException("cannot use MQTT broker address " + o.broker() + ": " + e.getMessage(), e);
        }
        try {
            MqttConnectOptions co = new MqttConnectOptions();
            co.setMqttVersion(MqttConnectOptions.MQTT_VERSION_3_1_1);
            co.setCleanSession(true);
            co.setMaxInflight(o.inflight());
            try {
                client.connect(co).waitForCompletion(15_000);
            } catch (MqttException e) {
                throw new IOException("cannot connect to MQTT broker " + o.broker() + ": " + e.getMessage(), e);
            }
            Result r = publish(client, o);
            out.printf(Locale.ROOT, "sent %d, completed %d, failed %d in %.2f s: %.0f msg/s (target %s), QoS %d,"
                            + " %d sensors in %d zones, topics %s/<zone>/<sensor>%n",
                    r.sent(), r.completed(), r.failed(), r.seconds(), r.ratePerSecond(),
                    o.rate() > 0 ? String.format(Locale.ROOT, "%.0f msg/s", o.rate()) : "flat out",
                    o.qos(), o.sensors(), o.zones(), o.topicPrefix());
            return r;
        } finally {
            try {
                if (client.isConnected()) client.disconnect(1_000).waitForCompletion(3_000);
            } catch (MqttException e) {
                // broker gone: nothing to say goodbye to
            }
            try {
                client.close(true);
            } catch (MqttException e) {
                // already closed
            }
        }
    }

    private static Result publish(MqttAsyncClient client, Options o) {
        String[] topics = new String[o.sensors()];
        for (int i = 0; i < topics.length; i++) topics[i] = LoadConfig.topic(o.topicPrefix(), i, o.sensors(), o.zones());
        // Our own bound on outstanding messages: Paho refuses a QoS 1 publish beyond max-inflight,
        // and queues QoS 0 publishes without limit.
        Semaphore window = new Semaphore(o.inflight());
        AtomicLong completed = new AtomicLong();
        AtomicLong failed = new AtomicLong();
        IMqttActionListener done = new IMqttActionListener() {
            @Override public void onSuccess(IMqttToken t) { completed.incrementAndGet(); window.release(); }
            @Override public void onFailure(IMqttToken t, Throwable e) { failed.incrementAndGet(); window.release(); }
        };
        long start = System.nanoTime();
        long end = start + o.duration().toNanos();
        double nanosPerMessage = o.rate() > 0 ? 1e9 / o.rate() : 0;
        long sent = 0;
        // Payload times: the clock's, but at least a millisecond after the sensor's previous one, so no two readings
        // of a sensor share a time (the history keeps one row per sensor and time); ahead of the clock only beyond
        // 1000 msg/s per sensor. (Times that stood still made a long paced run's readings look older than the zones'
        // max-age after a few minutes, so byre stopped deriving.)
        long[] lastMs = new long[o.sensors()];
        outer:
        while (o.count() == 0 || sent < o.count()) {
            long now = System.nanoTime();
            if (now >= end) break;
            if (nanosPerMessage > 0) {
                long due = start + (long) (sent * nanosPerMessage);
                if (due >= end) break;
                while ((now = System.nanoTime()) < due) LockSupport.parkNanos(due - now);
            }
            int i = (int) (sent % o.sensors());
            lastMs[i] = Math.max(lastMs[i] + 1, System.currentTimeMillis());
            MqttMessage m = new MqttMessage(LoadConfig.payload(i, sent, lastMs[i], o.zones())
                    .getBytes(StandardCharsets.UTF_8));
            m.setQos(o.qos());
            try {
                while (!window.tryAcquire(100, TimeUnit.MILLISECONDS)) {
                    if (!client.isConnected()) break outer;
                }
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
                break;
            }
            while (true) {
                try {
                    client.publish(topics[i], m, null, done);
                    sent++;
                    break;
                } catch (MqttException e) {
                    if (e.getReasonCode() == MqttException.REASON_CODE_MAX_INFLIGHT) {
                        LockSupport.parkNanos(200_000);   // Paho's window is full: back off, retry
                        continue;
                    }
                    window.release();
                    failed.incrementAndGet();
                    break outer;
                }
            }
        }
        // wait for the acknowledgements still on the way
        try {
            window.tryAcquire(o.inflight(), 30, TimeUnit.SECONDS);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
        double seconds = (System.nanoTime() - start) / 1e9;
        return new Result(sent, completed.get(), failed.get(), seconds);
    }
}
