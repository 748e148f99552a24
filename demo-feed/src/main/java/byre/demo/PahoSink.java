package byre.demo;

import java.util.UUID;
import org.eclipse.paho.client.mqttv3.IMqttDeliveryToken;
import org.eclipse.paho.client.mqttv3.MqttAsyncClient;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.MqttException;
import org.eclipse.paho.client.mqttv3.MqttMessage;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;

/**
 * Publishes to an MQTT 3.1.1 broker with Paho. Every instance gets its own client id (two clients
 * with one id knock each other off the broker), and keeps no files (MemoryPersistence; Paho's
 * default would write into the working directory).
 */
public final class PahoSink implements FeedSink {
    private static final long ACK_WAIT_MS = 10_000;

    private final MqttAsyncClient client;
    private final int qos;
    private final String brokerUri;

    /**
     * Connects before returning.
     *
     * @param clientIdPrefix a unique suffix is appended
     * @throws java.io.IOException when the broker cannot be reached, with the broker and the reason
     */
    public PahoSink(String brokerUri, String clientIdPrefix, int qos) throws java.io.IOException {
        if (qos < 0 || qos > 2) throw new IllegalArgumentException("qos must be 0, 1 or 2, got " + qos);
        this.brokerUri = brokerUri;
        this.qos = qos;
        try {
            client = new MqttAsyncClient(brokerUri, uniqueClientId(clientIdPrefix), new MemoryPersistence());
        } catch (MqttException | IllegalArgumentException e) {
            throw new java.io.IOException("cannot use MQTT broker address " + brokerUri + ": " + e.getMessage(), e);
        }
        MqttConnectOptions options = new MqttConnectOptions();
        options.setMqttVersion(MqttConnectOptions.MQTT_VERSION_3_1_1);
        options.setCleanSession(true);
        options.setAutomaticReconnect(false);
        options.setConnectionTimeout(10);
        options.setMaxInflight(100);
        try {
            client.connect(options).waitForCompletion(15_000);
        } catch (MqttException e) {
            closeQuietly();
            throw new java.io.IOException("cannot connect to MQTT broker " + brokerUri + ": " + e.getMessage(), e);
        }
    }

    /**
     * {@code prefix-} followed by 12 random hex digits. A prefix of up to 10 characters keeps the id
     * within the 23 bytes every MQTT 3.1.1 broker must accept.
     */
    public static String uniqueClientId(String prefix) {
        String p = prefix == null || prefix.isBlank() ? "byre-feed" : prefix;
        return p + "-" + UUID.randomUUID().toString().replace("-", "").substring(0, 12);
    }

    public String clientId() { return client.getClientId(); }

    @Override
    public void publish(FeedMessage m) throws Exception {
        MqttMessage msg = new MqttMessage(m.payload());
        msg.setQos(qos);
        IMqttDeliveryToken token = client.publish(m.topic(), msg);
        token.waitForCompletion(ACK_WAIT_MS);
    }

    @Override
    public void close() {
        try {
            if (client.isConnected()) client.disconnect(500).waitForCompletion(2_000);
        } catch (MqttException e) {
            // the broker went away first: nothing left to say to it
        }
        closeQuietly();
    }

    private void closeQuietly() {
        try {
            client.disconnectForcibly(100, 100, false);
        } catch (MqttException e) {
            // already disconnected
        }
        try {
            client.close(true);
        } catch (MqttException e) {
            // closing a client that never connected
        }
    }

    @Override
    public String toString() { return "MQTT " + brokerUri + " as " + clientId() + " (QoS " + qos + ")"; }
}
