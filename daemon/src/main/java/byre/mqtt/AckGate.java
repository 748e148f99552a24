package byre.mqtt;

import java.util.concurrent.atomic.AtomicBoolean;
import java.util.concurrent.locks.ReentrantReadWriteLock;
import java.util.function.BooleanSupplier;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Lets the acknowledgement of a QoS 1 message out only on the connection that delivered it, and only while the
 * client says it is connected. A packet id names a message only on its own connection: on the next one the same
 * id may name another message. An acknowledgement handed to the client while it reconnects can also leave its
 * connect waiting for ever. A dropped acknowledgement is only logged (debug): after a loss the broker delivers
 * every unacknowledged message again, and that delivery is acknowledged in its turn.
 * <p>
 * Each acknowledgement goes out at most once, however often it is run: once a PUBACK is sent, its packet id may name
 * the next message on the same connection (MQTT 3.1.1 section 4.3.2), which a second PUBACK would acknowledge
 * before it is stored. (A handler that fails after handing the acknowledgement on is acknowledged by the link, and
 * the commit later runs the same acknowledgement again.)
 */
final class AckGate {
    private static final Logger LOG = LoggerFactory.getLogger(AckGate.class);

    /** Hands the client the acknowledgement of message {@code id} (the client's manual acknowledgement). */
    @FunctionalInterface
    interface Sender {
        void send(int id, int qos) throws Exception;
    }

    private final BooleanSupplier clientConnected;
    private final Sender sender;
    /** Held (shared) while an acknowledgement is handed over, exclusively while the connection number moves. */
    private final ReentrantReadWriteLock lock = new ReentrantReadWriteLock();
    /** Number of the current connection; written only under the exclusive lock. */
    private volatile long connection;

    AckGate(BooleanSupplier clientConnected, Sender sender) {
        this.clientConnected = clientConnected;
        this.sender = sender;
    }

    /**
     * The acknowledgement of a message that arrived on the current connection, null at QoS 0 (nothing to
     * acknowledge). Safe to run on any thread; only its first run does anything. Acknowledgements go out in the
     * order they are run.
     */
    Runnable ackFor(int id, int qos) {
        if (qos == 0) return null;
        long deliveredOn = connection;
        AtomicBoolean ran = new AtomicBoolean();
        return () -> {
            if (!ran.compareAndSet(false, true)) {
                LOG.debug("acknowledgement of message {} run again: not sent twice", id);
                return;
            }
            lock.readLock().lock();
            try {
                // The client turns "not connected" first thing when its socket fails, before it reports the loss
                // (which moves the connection number): an acknowledgement handed to it then could go out later on
                // the next connection, where the same packet id may name another message.
                if (deliveredOn != connection || !clientConnected.getAsBoolean()) {
                    LOG.debug("acknowledgement of message {} not sent: its connection is gone", id);
                    return;
                }
                sender.send(id, qos);
            } catch (Exception e) {
                // The connection went away in between: the broker delivers the message again.
                LOG.debug("acknowledgement of message {} not sent: {}", id, e.toString());
            } finally {
                lock.readLock().unlock();
            }
        };
    }

    /**
     * A new connection number (before every connection attempt and on every loss): acknowledgements of messages
     * from earlier connections are not sent. Waits for an acknowledgement being handed over right now.
     */
    void nextConnection() {
        lock.writeLock().lock();
        try {
            connection++;
        } finally {
            lock.writeLock().unlock();
        }
    }

    /** True while a thread waits to move the connection number (for tests of the hand-over). */
    boolean connectionChangeWaiting() {
        return lock.hasQueuedThreads();
    }
}
