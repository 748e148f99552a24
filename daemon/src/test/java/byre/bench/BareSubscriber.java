package byre.bench;

import java.io.BufferedReader;
import java.io.IOException;
import java.io.InputStreamReader;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.UUID;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicLong;
import org.eclipse.paho.client.mqttv3.MqttClient;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;

/**
 * The benchmark's baseline as its own JVM: a bare Paho client (defaults, clean session, automatic
 * acknowledgements) subscribed to {@code <prefix>/#} at QoS 1 that only counts. Every 20 ms it prints
 * {@code <messages> <System.nanoTime of the last arrival>} when the count has changed (CLOCK_MONOTONIC, the
 * same clock in every process on the machine). {@link Peer} launches it with byre's own JVM options.
 */
public final class BareSubscriber {
    public static void main(String[] args) throws Exception {
        AtomicLong got = new AtomicLong();
        AtomicLong lastNanos = new AtomicLong();
        MqttClient c = new MqttClient(args[0], "bench-bare-" + UUID.randomUUID().toString().substring(0, 8), new MemoryPersistence());
        MqttConnectOptions o = new MqttConnectOptions();
        o.setCleanSession(true);
        o.setMaxInflight(1000);
        c.connect(o);
        c.subscribe(args[1] + "/#", 1, (t, msg) -> {
            lastNanos.set(System.nanoTime());
            got.incrementAndGet();
        });
        System.out.println("READY");
        System.out.flush();
        long printed = -1;
        while (true) {
            long n = got.get();
            if (n != printed) {
                System.out.println(n + " " + lastNanos.get());
                System.out.flush();
                printed = n;
            }
            Thread.sleep(20);
        }
    }

    /** A running {@link BareSubscriber} and what it last said. */
    static final class Peer implements AutoCloseable {
        private final Process process;
        private volatile long got;
        private volatile long lastNanos;
        private volatile boolean ready;

        Peer(String brokerUri, String prefix, List<String> jvmOptions) throws IOException {
            List<String> cmd = new ArrayList<>();
            cmd.add(Path.of(System.getProperty("java.home"), "bin", "java").toString());
            cmd.addAll(jvmOptions);
            cmd.addAll(List.of("-cp", System.getProperty("java.class.path"), BareSubscriber.class.getName(), brokerUri, prefix));
            process = new ProcessBuilder(cmd).redirectErrorStream(true).start();
            Thread reader = new Thread(() -> {
                try (BufferedReader r = new BufferedReader(new InputStreamReader(process.getInputStream(), StandardCharsets.UTF_8))) {
                    for (String line; (line = r.readLine()) != null; ) {
                        if (line.equals("READY")) {
                            ready = true;
                        } else if (line.matches("\\d+ \\d+")) {
                            String[] p = line.split(" ");
                            lastNanos = Long.parseLong(p[1]);
                            got = Long.parseLong(p[0]);
                        } else {
                            System.err.println("bare subscriber: " + line);
                        }
                    }
                } catch (IOException e) {
                    // the process ended
                }
            }, "bare-subscriber-output");
            reader.setDaemon(true);
            reader.start();
            long until = System.nanoTime() + TimeUnit.SECONDS.toNanos(30);
            while (!ready && process.isAlive() && System.nanoTime() < until) sleep(10);
            if (!ready) throw new IllegalStateException("the bare subscriber did not start");
        }

        long got() { return got; }

        long lastNanos() { return lastNanos; }

        @Override
        public void close() {
            process.destroy();
            try {
                if (!process.waitFor(10, TimeUnit.SECONDS)) process.destroyForcibly();
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            }
        }

        private static void sleep(long ms) {
            try {
                Thread.sleep(ms);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
            }
        }
    }
}
