package byre.faults;

import java.nio.charset.StandardCharsets;
import java.util.Set;
import java.util.UUID;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.atomic.AtomicLong;
import org.eclipse.paho.client.mqttv3.MqttClient;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.MqttException;
import org.eclipse.paho.client.mqttv3.MqttMessage;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;

/**
 * Stands in for the barn's sensors during a fault: round robin over {@link FaultRig#SENSORS}, QoS 1, each
 * reading with its own millisecond time. A reading is retried until the broker acknowledges it (as firmware
 * with a small buffer would), so every reading in {@link #acknowledged()} reached the broker at least once.
 */
final class SensorStream implements AutoCloseable {
    private final String uri;
    private final long firstTsMs;
    private final long pauseMicros;
    private final Set<String> acknowledged = ConcurrentHashMap.newKeySet();
    private final AtomicLong sent = new AtomicLong();
    private final Thread thread;
    private volatile boolean stop;
    private MqttClient client;

    /** @param perSecond readings per second over all sensors */
    SensorStream(String uri, long firstTsMs, int perSecond) {
        this.uri = uri;
        this.firstTsMs = firstTsMs;
        this.pauseMicros = 1_000_000L / perSecond;
        this.thread = new Thread(this::run, "sensor-stream");
        thread.setDaemon(true);
        thread.start();
    }

    private void run() {
        long n = 0;
        while (!stop) {
            int s = (int) (n % FaultRig.SENSORS.length);
            long ts = firstTsMs + n; // one ms apart: distinct per sensor
            MqttMessage m = new MqttMessage(FaultRig.payload(s, n, ts).getBytes(StandardCharsets.UTF_8));
            m.setQos(1);
            while (!stop) {
                try {
                    if (client == null || !client.isConnected()) connect();
                    client.publish(FaultRig.TOPICS[s], m);
                    acknowledged.add(FaultRig.SENSORS[s] + "@" + ts);
                    sent.incrementAndGet();
                    break;
                } catch (MqttException e) {
                    sleepMicros(50_000); // the broker is down: keep the reading and try again
                }
            }
            n++;
            sleepMicros(pauseMicros);
        }
        try {
            if (client != null && client.isConnected()) client.disconnect(1000);
            if (client != null) client.close(true);
        } catch (MqttException ignored) {
            // the broker may be gone
        }
    }

    private void connect() throws MqttException {
        if (client != null) {
            try {
                client.close(true);
            } catch (MqttException ignored) {
                // a dead client
            }
        }
        client = new MqttClient(uri, "fault-sensors-" + UUID.randomUUID().toString().substring(0, 8), new MemoryPersistence());
        MqttConnectOptions o = new MqttConnectOptions();
        o.setCleanSession(true);
        o.setConnectionTimeout(2);
        client.setTimeToWait(3000);
        client.connect(o);
    }

    private static void sleepMicros(long us) {
        try {
            Thread.sleep(us / 1000, (int) (us % 1000) * 1000);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }

    long sent() {
        return sent.get();
    }

    Set<String> acknowledged() {
        return Set.copyOf(acknowledged);
    }

    @Override
    public void close() throws InterruptedException {
        stop = true;
        thread.join(10_000);
    }
}
