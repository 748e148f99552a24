package byre.mqtt;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.charset.StandardCharsets;
import java.util.List;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import org.eclipse.paho.client.mqttv3.IMqttDeliveryToken;
import org.eclipse.paho.client.mqttv3.MqttAsyncClient;
import org.eclipse.paho.client.mqttv3.MqttCallback;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.MqttMessage;
import org.eclipse.paho.client.mqttv3.ScheduledExecutorPingSender;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;
import org.junit.jupiter.api.Test;

/**
 * The MQTT client's threads with a real Paho client and byre's embedded broker: each of the three threads a connection
 * starts cuts its starter's nap short (without this, each connection waits about 300 ms for nothing), messages flow,
 * and no interrupt reaches the callback thread, where byre's handlers store readings.
 */
class ClientThreadsTest {
    @Test
    void everyConnectionCutsThePahoNapsShortAndNoInterruptReachesTheHandlers() throws Exception {
        int port = EmbeddedBroker.freePort("127.0.0.1");
        try (EmbeddedBroker broker = EmbeddedBroker.start("127.0.0.1", port)) {
            ClientThreads threads = new ClientThreads("test");
            MqttAsyncClient client = new MqttAsyncClient("tcp://127.0.0.1:" + port, "threads-test", new MemoryPersistence(),
                    new ScheduledExecutorPingSender(threads), threads);
            List<String> interrupted = new CopyOnWriteArrayList<>();
            CountDownLatch arrived = new CountDownLatch(2);
            client.setCallback(new MqttCallback() {
                @Override
                public void connectionLost(Throwable cause) {}

                @Override
                public void messageArrived(String topic, MqttMessage message) {
                    if (Thread.currentThread().isInterrupted()) interrupted.add(topic);
                    arrived.countDown();
                }

                @Override
                public void deliveryComplete(IMqttDeliveryToken token) {}
            });
            try {
                for (int connection = 1; connection <= 2; connection++) {
                    MqttConnectOptions o = new MqttConnectOptions();
                    o.setCleanSession(true);
                    client.connect(o).waitForCompletion(10_000);
                    assertTrue(client.isConnected());
                    assertEquals(3 * connection, threads.nudges(), "receiver, sender and callback each cut a nap short");
                    client.subscribe("larkmoor/calf-barn/t", 1).waitForCompletion(10_000);
                    client.publish("larkmoor/calf-barn/t", "21.5".getBytes(StandardCharsets.UTF_8), 1, false).waitForCompletion(10_000);
                    client.disconnect().waitForCompletion(10_000);
                }
                assertTrue(arrived.await(10, TimeUnit.SECONDS), "both messages arrived");
                assertEquals(List.of(), interrupted, "no handler ran with an interrupt pending");
            } finally {
                if (client.isConnected()) client.disconnectForcibly(1000, 1000);
                client.close(true);
                threads.shutdownNow();
            }
            assertFalse(Thread.currentThread().isInterrupted());
        }
    }
}
