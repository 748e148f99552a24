package byre.testing;

import java.nio.charset.StandardCharsets;
import java.util.UUID;
import org.eclipse.paho.client.mqttv3.MqttClient;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.MqttException;
import org.eclipse.paho.client.mqttv3.MqttMessage;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;

/** A plain Paho client standing in for sensor firmware: unique id, QoS 1 by default. */
public final class TestPublisher implements AutoCloseable {
    private final MqttClient client;

    public TestPublisher(String uri) throws MqttException {
        client = new MqttClient(uri, "test-pub-" + UUID.randomUUID().toString().substring(0, 8), new MemoryPersistence());
        MqttConnectOptions o = new MqttConnectOptions();
        o.setCleanSession(true);
        o.setMaxInflight(1000);
        client.connect(o);
    }

    public void publish(String topic, String payload) throws MqttException {
        publish(topic, payload, 1, false);
    }

    public void publish(String topic, String payload, int qos, boolean retained) throws MqttException {
        MqttMessage m = new MqttMessage(payload.getBytes(StandardCharsets.UTF_8));
        m.setQos(qos);
        m.setRetained(retained);
        client.publish(topic, m);
    }

    public MqttClient client() {
        return client;
    }

    @Override
    public void close() throws MqttException {
        if (client.isConnected()) client.disconnect(2000);
        client.close();
    }
}
