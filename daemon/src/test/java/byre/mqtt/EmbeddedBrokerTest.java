package byre.mqtt;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.io.ByteArrayOutputStream;
import java.io.InputStream;
import java.net.Socket;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.List;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.concurrent.TimeUnit;
import org.eclipse.paho.client.mqttv3.IMqttDeliveryToken;
import org.eclipse.paho.client.mqttv3.MqttAsyncClient;
import org.eclipse.paho.client.mqttv3.MqttClient;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.MqttMessage;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;
import org.junit.jupiter.api.Test;

/** byre's embedded broker with real clients: Paho, raw MQTT packets over a socket, and Debian's mosquitto_pub/_sub. */
class EmbeddedBrokerTest {
    static MqttClient subscriber(EmbeddedBroker b, String id, String filter, List<String> seen) throws Exception {
        MqttClient c = new MqttClient(b.uri(), id, new MemoryPersistence());
        MqttConnectOptions o = new MqttConnectOptions();
        o.setCleanSession(false);
        c.connect(o);
        c.subscribe(filter, 1, (topic, m) -> seen.add(topic + " " + new String(m.getPayload(), StandardCharsets.UTF_8)));
        return c;
    }

    @Test
    void listensOnLoopbackOnly() {
        assertThrows(IllegalArgumentException.class, () -> EmbeddedBroker.start("0.0.0.0", 0));
        assertThrows(IllegalArgumentException.class, () -> EmbeddedBroker.start("192.168.1.20", 0));
    }

    @Test
    void aClientWithAnEmptyIdAndACleanSessionIsAccepted() throws Exception {
        try (EmbeddedBroker b = EmbeddedBroker.start("127.0.0.1", 0)) {
            List<String> seen = new CopyOnWriteArrayList<>();
            MqttClient sub = subscriber(b, "byre-test", "larkmoor/#", seen);
            MqttClient anon = new MqttClient(b.uri(), "", new MemoryPersistence());
            MqttConnectOptions o = new MqttConnectOptions();
            o.setCleanSession(true);
            anon.connect(o); // MQTT 3.1.1 section 3.1.3.1: the server assigns an id
            anon.publish("larkmoor/cow-shed/dry", "24.5".getBytes(StandardCharsets.UTF_8), 1, false);
            await().atMost(Duration.ofSeconds(10)).until(() -> seen.contains("larkmoor/cow-shed/dry 24.5"));
            anon.disconnect();
            anon.close();
            sub.disconnect();
            sub.close();
        }
    }

    @Test
    void plainMosquittoPubAndSubWork() throws Exception {
        assumeTrue(Files.isExecutable(Path.of("/usr/bin/mosquitto_pub")) && Files.isExecutable(Path.of("/usr/bin/mosquitto_sub")),
                "mosquitto-clients is not installed");
        try (EmbeddedBroker b = EmbeddedBroker.start("127.0.0.1", 0)) {
            String port = Integer.toString(b.port());
            Process sub = new ProcessBuilder("/usr/bin/mosquitto_sub", "-h", "127.0.0.1", "-p", port, "-t", "larkmoor/#", "-v", "-C", "1",
                    "-W", "20").redirectErrorStream(true).start();
            try {
                // mosquitto_pub sends its message and leaves; repeat until the subscriber (which starts in parallel) has it.
                await().atMost(Duration.ofSeconds(15)).pollInterval(Duration.ofMillis(200)).until(() -> {
                    Process pub = new ProcessBuilder("/usr/bin/mosquitto_pub", "-h", "127.0.0.1", "-p", port, "-q", "1",
                            "-t", "larkmoor/calf-barn/pen1/dry", "-m", "5.5").redirectErrorStream(true).start();
                    String out = new String(pub.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
                    assertTrue(pub.waitFor(10, TimeUnit.SECONDS));
                    assertEquals(0, pub.exitValue(), "mosquitto_pub: " + out);
                    return !sub.isAlive();
                });
                assertTrue(sub.waitFor(10, TimeUnit.SECONDS));
                assertEquals("larkmoor/calf-barn/pen1/dry 5.5", new String(sub.getInputStream().readAllBytes(), StandardCharsets.UTF_8).strip());
                assertEquals(0, sub.exitValue());
            } finally {
                sub.destroyForcibly();
            }
        }
    }

    /** MQTT 3.1.1 packets by hand, so that a topic can hold bytes no well-behaved client library would send. */
    static final class RawClient implements AutoCloseable {
        final Socket socket;

        RawClient(int port, String clientId) throws Exception {
            socket = new Socket("127.0.0.1", port);
            socket.setSoTimeout(10_000);
            ByteArrayOutputStream v = new ByteArrayOutputStream();
            v.write(new byte[] {0, 4, 'M', 'Q', 'T', 'T', 4, 2, 0, 60}); // protocol name, level 4, clean session, keep-alive 60 s
            writeString(v, clientId.getBytes(StandardCharsets.UTF_8));
            send(0x10, v.toByteArray());
            byte[] connack = socket.getInputStream().readNBytes(4);
            assertEquals(0x20, connack[0] & 0xff, "CONNACK");
            assertEquals(0, connack[3], "connection accepted");
        }

        void publishQos1(byte[] topic, int packetId, String payload) throws Exception {
            ByteArrayOutputStream v = new ByteArrayOutputStream();
            writeString(v, topic);
            v.write(packetId >> 8);
            v.write(packetId);
            v.write(payload.getBytes(StandardCharsets.UTF_8));
            send(0x32, v.toByteArray());
        }

        /** The next byte from the broker, or -1 once it has closed the connection. */
        int read() throws Exception {
            try {
                return socket.getInputStream().read();
            } catch (java.net.SocketException reset) {
                return -1;
            }
        }

        /** The type byte of each packet the broker sends until it closes the connection (10 s socket timeout). */
        List<Integer> packetTypesUntilClosed() throws Exception {
            List<Integer> types = new java.util.ArrayList<>();
            for (int type = read(); type != -1; type = read()) {
                types.add(type);
                int length = 0;
                int shift = 0;
                int digit;
                do {
                    digit = read();
                    if (digit == -1) return types;
                    length |= (digit & 0x7f) << shift;
                    shift += 7;
                } while ((digit & 0x80) != 0);
                for (int i = 0; i < length; i++) {
                    if (read() == -1) return types;
                }
            }
            return types;
        }

        private void send(int type, byte[] body) throws Exception {
            ByteArrayOutputStream p = new ByteArrayOutputStream();
            p.write(type);
            int len = body.length;
            do {
                int digit = len % 128;
                len /= 128;
                p.write(len > 0 ? digit | 0x80 : digit);
            } while (len > 0);
            p.write(body);
            socket.getOutputStream().write(p.toByteArray());
            socket.getOutputStream().flush();
        }

        private static void writeString(ByteArrayOutputStream out, byte[] s) {
            out.write(s.length >> 8);
            out.write(s.length);
            out.write(s, 0, s.length);
        }

        @Override
        public void close() throws Exception {
            socket.close();
        }
    }

    @Test
    void topicsThatAreNotValidUtf8OrHoldNulAreNotForwardedAndTheirSenderIsDisconnected() throws Exception {
        SimpleMeterRegistry registry = new SimpleMeterRegistry();
        try (EmbeddedBroker b = EmbeddedBroker.start("127.0.0.1", 0, registry)) {
            List<String> seen = new CopyOnWriteArrayList<>();
            MqttClient sub = subscriber(b, "byre-test", "#", seen);
            byte[][] bad = {
                {'l', 'a', 'r', 'k', '/', (byte) 0xC3, (byte) 0x28},        // a broken two-byte sequence
                {'l', 'a', 'r', 'k', '/', (byte) 0xED, (byte) 0xA0, (byte) 0x80}, // an encoded surrogate (not UTF-8)
                {'l', 'a', 'r', 'k', '/', 0, 'x'},                          // U+0000
                "lark/x\nINFO  byre - forged".getBytes(StandardCharsets.UTF_8),  // a control character
            };
            for (byte[] topic : bad) {
                try (RawClient raw = new RawClient(b.port(), "")) {
                    raw.publishQos1(topic, 1, "1");
                    // Moquette may send a DISCONNECT (0xE0) before it closes, or the close may come first.
                    assertEquals(List.of(), raw.packetTypesUntilClosed().stream().filter(t -> t != 0xE0).toList(),
                            "no PUBACK, nothing but a DISCONNECT, then the connection is closed");
                }
            }
            try (RawClient raw = new RawClient(b.port(), "")) {
                raw.publishQos1("lark/ok/\u00e9".getBytes(StandardCharsets.UTF_8), 2, "2");
                assertEquals(0x40, raw.read(), "PUBACK for a valid topic");
            }
            await().atMost(Duration.ofSeconds(10)).until(() -> seen.contains("lark/ok/\u00e9 2"));
            assertEquals(List.of("lark/ok/\u00e9 2"), seen, "only the valid topic was forwarded (it was sent last)");
            assertEquals(4.0, registry.counter("byre.broker.refused", "reason", "bad-topic").count());
            sub.disconnect();
            sub.close();
        }
    }

    @Test
    void noClientIsAcceptedBeforeByreHasSubscribedSoNoQos1ReadingIsAcknowledgedAndLost() throws Exception {
        try (EmbeddedBroker b = EmbeddedBroker.startGated("127.0.0.1", 0, new SimpleMeterRegistry())) {
            // A sensor that was waiting for the broker connects and publishes the moment the address is bound.
            MqttAsyncClient sensor = new MqttAsyncClient(b.uri(), "pen1-node", new MemoryPersistence());
            MqttConnectOptions so = new MqttConnectOptions();
            so.setCleanSession(true);
            var connecting = sensor.connect(so);
            Thread.sleep(300); // a bounded look: the connection waits in the listen queue, unanswered
            assertFalse(connecting.isComplete(), "no CONNACK before byre has subscribed");

            List<String> seen = new CopyOnWriteArrayList<>();
            MqttClient byre = new MqttClient("tcp://127.0.0.1:" + b.ownPort(), "byre-larkmoor", new MemoryPersistence());
            MqttConnectOptions bo = new MqttConnectOptions();
            bo.setCleanSession(false);
            byre.connect(bo);
            byre.subscribe("larkmoor/#", 1, (topic, m) -> seen.add(topic + " " + new String(m.getPayload(), StandardCharsets.UTF_8)));
            b.open();

            connecting.waitForCompletion(10_000);
            IMqttDeliveryToken token = sensor.publish("larkmoor/calf-barn/pen1/dry", new MqttMessage("5.5".getBytes(StandardCharsets.UTF_8)));
            token.waitForCompletion(10_000); // acknowledged...
            await().atMost(Duration.ofSeconds(10)).until(() -> seen.contains("larkmoor/calf-barn/pen1/dry 5.5")); // ...and delivered
            sensor.disconnect().waitForCompletion(5_000);
            sensor.close();
            byre.disconnect();
            byre.close();
        }
    }
}
