package byre.mqtt;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import ch.qos.logback.classic.Logger;
import ch.qos.logback.classic.spi.ILoggingEvent;
import ch.qos.logback.core.read.ListAppender;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.io.OutputStream;
import java.net.Socket;
import java.time.Duration;
import java.util.List;
import org.eclipse.paho.client.mqttv3.MqttClient;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;
import org.junit.jupiter.api.Test;
import org.slf4j.LoggerFactory;

/** The embedded broker's errors become one byre line each and a count, not a stack trace per bad packet. */
class BrokerLogTest {
    @Test
    void anOversizedAGarbledAndAWildcardPublishGiveOneLineEachAndACount() throws Exception {
        SimpleMeterRegistry registry = new SimpleMeterRegistry();
        Logger root = (Logger) LoggerFactory.getLogger(org.slf4j.Logger.ROOT_LOGGER_NAME);
        ListAppender<ILoggingEvent> log = new ListAppender<>();
        log.start();
        root.addAppender(log);
        try (EmbeddedBroker broker = EmbeddedBroker.start("127.0.0.1", 0, registry)) {
            double before = registry.get("byre.broker.errors").functionCounter().count();
            MqttClient c = new MqttClient(broker.uri(), "larkmoor-big", new MemoryPersistence());
            c.connect();
            try {
                c.publish("larkmoor/hutches/h1/dry", new byte[20_000], 1, false);
            } catch (Exception expected) {
                // the broker closes the connection
            }
            await().atMost(Duration.ofSeconds(10)).until(() -> registry.get("byre.broker.errors").functionCounter().count() >= before + 1);
            try (Socket s = new Socket("127.0.0.1", broker.port())) {
                OutputStream out = s.getOutputStream();
                // a CONNECT whose remaining length promises more than the 4 length bytes MQTT allows
                out.write(new byte[] {0x10, (byte) 0xff, (byte) 0xff, (byte) 0xff, (byte) 0xff, 0x7f, 1, 2, 3});
                out.flush();
                await().atMost(Duration.ofSeconds(10)).until(() -> registry.get("byre.broker.errors").functionCounter().count() >= before + 2);
            }
            try (Socket s = new Socket("127.0.0.1", broker.port())) {
                // a client that connects and publishes to a topic with a wildcard, which MQTT forbids in PUBLISH
                OutputStream out = s.getOutputStream();
                byte[] connect = concat(str("MQTT"), new byte[] {4, 2, 0, 60}, str("larkmoor-raw"));
                byte[] publish = concat(str("larkmoor/+/dry"), "12.5".getBytes(java.nio.charset.StandardCharsets.UTF_8));
                out.write(concat(new byte[] {0x10, (byte) connect.length}, connect, new byte[] {0x30, (byte) publish.length}, publish));
                out.flush();
                await().atMost(Duration.ofSeconds(10)).until(() -> registry.get("byre.broker.errors").functionCounter().count() >= before + 3);
            }
            c.close(true);
        } finally {
            root.detachAppender(log);
        }
        List<ILoggingEvent> events = List.copyOf(log.list);
        List<ILoggingEvent> fromLibrary = events.stream()
                .filter(e -> e.getLoggerName().startsWith("io.moquette") || e.getLoggerName().startsWith("io.netty"))
                .filter(e -> e.getThrowableProxy() != null).toList();
        assertEquals(List.of(), fromLibrary.stream().map(ILoggingEvent::getFormattedMessage).toList(), "no stack traces from the library");
        List<String> ours = events.stream().filter(e -> e.getFormattedMessage().startsWith("embedded broker: "))
                .map(ILoggingEvent::getFormattedMessage).toList();
        assertTrue(ours.stream().anyMatch(m -> m.contains("TooLongFrameException") && m.contains("larkmoor-big")), ours.toString());
        assertTrue(ours.stream().anyMatch(m -> m.contains("larkmoor/+/dry")), ours.toString());
        assertTrue(ours.size() >= 3 && ours.size() <= 6, ours.toString());
        assertTrue(events.stream().filter(e -> e.getFormattedMessage().startsWith("embedded broker: ")).allMatch(e -> e.getThrowableProxy() == null));
    }

    static byte[] str(String s) {
        byte[] b = s.getBytes(java.nio.charset.StandardCharsets.UTF_8);
        return concat(new byte[] {(byte) (b.length >> 8), (byte) b.length}, b);
    }

    static byte[] concat(byte[]... parts) {
        java.io.ByteArrayOutputStream out = new java.io.ByteArrayOutputStream();
        for (byte[] p : parts) out.writeBytes(p);
        return out.toByteArray();
    }

    @Test
    void networkTextIsCleaned() {
        assertEquals("CId=a?b", BrokerLog.clean("CId=a\nb"));
        assertEquals(200, BrokerLog.clean("x".repeat(5000)).length());
    }
}
