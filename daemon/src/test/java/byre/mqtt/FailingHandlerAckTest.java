package byre.mqtt;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;

import byre.config.MqttSettings;
import byre.testing.RawMqtt;
import ch.qos.logback.classic.Logger;
import ch.qos.logback.classic.spi.ILoggingEvent;
import ch.qos.logback.core.read.ListAppender;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.net.InetAddress;
import java.net.ServerSocket;
import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.util.List;
import java.util.UUID;
import java.util.concurrent.atomic.AtomicReference;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.Timeout;
import org.slf4j.LoggerFactory;

/**
 * A handler that fails after taking a message's acknowledgement (a reading handed to the history, then an error):
 * the link acknowledges the failed message, and the commit later runs the same acknowledgement again. The broker
 * sees one PUBACK per message all the same; a second one could acknowledge a newer message that reused the packet
 * id before it is stored (MQTT 3.1.1 section 4.3.2). The broker is {@link FakeBroker}, which records every PUBACK.
 */
@Timeout(30)
class FailingHandlerAckTest {
    @Test
    void aMessageWhoseHandlerFailedAfterTakingItsAcknowledgementIsAcknowledgedOnce() throws Exception {
        byte[] payload = "21.5".getBytes(StandardCharsets.UTF_8);
        List<byte[]> deliveries = List.of(
                RawMqtt.publishPacket("larkmoor/calf-barn/pen1/dry".getBytes(StandardCharsets.UTF_8), payload, 1, 1, false),
                RawMqtt.publishPacket("larkmoor/cow-shed/note".getBytes(StandardCharsets.UTF_8), payload, 1, 2, false),
                RawMqtt.publishPacket("larkmoor/calf-barn/pen2/dry".getBytes(StandardCharsets.UTF_8), payload, 1, 3, false));
        AtomicReference<Runnable> heldAck = new AtomicReference<>();
        Logger linkLogger = (Logger) LoggerFactory.getLogger(MqttLink.class);
        ListAppender<ILoggingEvent> log = new ListAppender<>();
        log.start();
        linkLogger.addAppender(log);
        linkLogger.setAdditive(false); // the expected failures are read here, not printed
        ServerSocket server = new ServerSocket(0, 50, InetAddress.getLoopbackAddress());
        try (FakeBroker broker = new FakeBroker(server, deliveries)) {
            MqttLink link = new MqttLink(new MqttSettings("tcp://127.0.0.1:" + broker.port(), null, 0,
                    "byre-ack-once-" + UUID.randomUUID().toString().substring(0, 8), null, null, "byre", 1, null),
                    "larkmoor", new SimpleMeterRegistry());
            link.subscribeAcked("larkmoor/calf-barn/#", (topic, p, retained, ack) -> {
                if (topic.endsWith("pen1/dry")) {
                    heldAck.set(ack); // handed on to be run at the commit
                    throw new IllegalStateException("pen1 failed after taking its acknowledgement");
                }
                heldAck.get().run(); // pen1's commit comes late
                ack.run();
            });
            // A plain subscription acknowledges in a finally block, and the link's own catch runs the ack too.
            link.subscribe("larkmoor/cow-shed/note", (topic, p) -> {
                throw new IllegalStateException("the note handler failed");
            });
            link.start();
            try {
                // PUBACKs leave in the order they are run, so once message 3's is in, any repeat would be as well.
                await().atMost(Duration.ofSeconds(15)).until(() -> broker.acknowledged.contains(3));
                assertEquals(List.of(1, 2, 3), broker.acknowledged, "one PUBACK per message");
                assertEquals(1, broker.connections.get());
            } finally {
                link.close();
            }
        } finally {
            linkLogger.detachAppender(log);
            linkLogger.setAdditive(true);
        }
        assertEquals(2, log.list.stream().filter(e -> e.getFormattedMessage().startsWith("handler for ")).count(),
                "both handlers failed: " + log.list);
    }
}
