package byre.mqtt;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import ch.qos.logback.classic.Level;
import ch.qos.logback.classic.Logger;
import ch.qos.logback.classic.spi.ILoggingEvent;
import ch.qos.logback.core.read.ListAppender;
import java.time.Duration;
import java.util.List;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.Timeout;
import org.slf4j.LoggerFactory;

/**
 * The gate between committed readings and the broker: an acknowledgement goes out when it is run, on the
 * connection that delivered its message, while the client is connected; otherwise it is dropped and logged.
 * The client is stood in for by a recorder (the gate sees only "connected?" and "acknowledge id"); the real
 * client across a broker restart is {@link LateAckReconnectTest}'s.
 */
@Timeout(30)
class AckGateTest {
    record Sent(int id, int qos) {
    }

    final List<Sent> sent = new CopyOnWriteArrayList<>();
    volatile boolean clientConnected = true;
    final AckGate gate = new AckGate(() -> clientConnected, (id, qos) -> sent.add(new Sent(id, qos)));

    final Logger gateLogger = (Logger) LoggerFactory.getLogger(AckGate.class);
    final ListAppender<ILoggingEvent> log = new ListAppender<>();
    Level levelBefore;

    @BeforeEach
    void listen() {
        levelBefore = gateLogger.getLevel();
        gateLogger.setLevel(Level.DEBUG);
        gateLogger.setAdditive(false); // the debug lines are read here, not printed
        log.start();
        gateLogger.addAppender(log);
    }

    @AfterEach
    void stopListening() {
        gateLogger.detachAppender(log);
        gateLogger.setLevel(levelBefore);
        gateLogger.setAdditive(true);
    }

    List<String> lines() {
        return log.list.stream().map(ILoggingEvent::getFormattedMessage).toList();
    }

    @Test
    void anAcknowledgementGoesOutWhenRunThatIsAfterTheCommitNotOnArrival() {
        Runnable ack = gate.ackFor(7, 1);
        assertEquals(List.of(), sent, "nothing is acknowledged on arrival");
        ack.run(); // the history committed the reading
        assertEquals(List.of(new Sent(7, 1)), sent);
        Runnable qos2 = gate.ackFor(8, 2);
        qos2.run();
        assertEquals(List.of(new Sent(7, 1), new Sent(8, 2)), sent, "the message's own QoS is passed on");
        assertEquals(List.of(), lines());
    }

    /**
     * Once a PUBACK is out, its packet id may name the next message on the same connection (MQTT 3.1.1 section
     * 4.3.2): a second run of the acknowledgement, say by a commit after the link already acknowledged a handler's
     * failure, would acknowledge that message before it is stored.
     */
    @Test
    void anAcknowledgementRunTwiceGoesOutOnce() {
        Runnable ack = gate.ackFor(7, 1);
        ack.run();
        Runnable reused = gate.ackFor(7, 1); // the broker's next message, reusing the freed id
        ack.run();
        assertEquals(List.of(new Sent(7, 1)), sent, "the second run does not acknowledge the newer message 7");
        assertEquals(List.of("acknowledgement of message 7 run again: not sent twice"), lines());

        reused.run(); // the newer message is committed
        reused.run();
        assertEquals(List.of(new Sent(7, 1), new Sent(7, 1)), sent, "one PUBACK for each message");
    }

    @Test
    void qosZeroHasNothingToAcknowledge() {
        assertNull(gate.ackFor(0, 0));
    }

    @Test
    void anAcknowledgementFromAnEarlierConnectionIsDroppedAndTheRedeliveryIsAcknowledged() {
        Runnable first = gate.ackFor(7, 1);
        gate.nextConnection(); // lost, reconnected: the broker delivers message 7 again
        Runnable again = gate.ackFor(7, 1);

        first.run();
        assertEquals(List.of(), sent, "packet id 7 of the old connection is not acknowledged on the new one");
        assertEquals(List.of("acknowledgement of message 7 not sent: its connection is gone"), lines());

        again.run();
        assertEquals(List.of(new Sent(7, 1)), sent, "the redelivered copy is acknowledged once, on its own connection");
    }

    @Test
    void anAcknowledgementFromTwoConnectionsAgoIsDroppedToo() {
        Runnable old = gate.ackFor(3, 1);
        gate.nextConnection();
        gate.nextConnection();
        old.run();
        assertEquals(List.of(), sent);
    }

    @Test
    void nothingIsHandedToAClientThatSaysItIsDisconnected() {
        Runnable ack = gate.ackFor(5, 1);
        // the socket failed; the client has not yet reported the loss, so the connection number has not moved
        clientConnected = false;
        ack.run();
        assertEquals(List.of(), sent);
        assertEquals(List.of("acknowledgement of message 5 not sent: its connection is gone"), lines());
    }

    @Test
    void aHandOverThatFailsIsLoggedAndNotThrown() {
        AckGate failing = new AckGate(() -> true, (id, qos) -> {
            throw new IllegalStateException("client is disconnecting");
        });
        failing.ackFor(9, 1).run();
        assertEquals(List.of("acknowledgement of message 9 not sent: java.lang.IllegalStateException: client is disconnecting"), lines());
    }

    @Test
    void acknowledgementsGoOutInTheOrderTheyAreRunNoneWaitsForAnEarlierMessage() {
        Runnable one = gate.ackFor(1, 1);
        Runnable two = gate.ackFor(2, 1);
        Runnable three = gate.ackFor(3, 1);
        three.run();
        one.run();
        two.run();
        assertEquals(List.of(new Sent(3, 1), new Sent(1, 1), new Sent(2, 1)), sent);
    }

    @Test
    void acknowledgementsOfTheCurrentConnectionStillGoOutAfterOthersWereDropped() {
        Runnable old = gate.ackFor(1, 1);
        gate.nextConnection();
        Runnable current = gate.ackFor(2, 1);
        current.run();
        old.run();
        assertEquals(List.of(new Sent(2, 1)), sent);
    }

    /**
     * The number moves only between hand-overs: an acknowledgement that passed the check is handed over before
     * the connection counts as changed, and one from the old connection run afterwards is dropped.
     */
    @Test
    void aConnectionChangeWaitsForTheAcknowledgementBeingHandedOver() throws Exception {
        CountDownLatch handing = new CountDownLatch(1);
        CountDownLatch release = new CountDownLatch(1);
        AckGate slow = new AckGate(() -> true, (id, qos) -> {
            handing.countDown();
            if (!release.await(10, TimeUnit.SECONDS)) throw new IllegalStateException("never released");
            sent.add(new Sent(id, qos));
        });
        Runnable first = slow.ackFor(1, 1);
        Runnable second = slow.ackFor(2, 1);
        Thread acker = new Thread(first, "acker");
        acker.start();
        assertTrue(handing.await(10, TimeUnit.SECONDS));
        Thread lost = new Thread(slow::nextConnection, "connection-lost");
        lost.start();
        await().atMost(Duration.ofSeconds(10)).until(slow::connectionChangeWaiting);
        assertTrue(lost.isAlive(), "the connection number waits for the hand-over");

        release.countDown();
        acker.join(10_000);
        lost.join(10_000);
        assertEquals(List.of(new Sent(1, 1)), sent);
        second.run();
        assertEquals(List.of(new Sent(1, 1)), sent, "an acknowledgement run after the change is dropped");
    }
}
