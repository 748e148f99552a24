package byre.mqtt;

import byre.config.MqttSettings;
import byre.log.RateLimitedLog;
import byre.time.Ticker;
import io.micrometer.core.instrument.Counter;
import io.micrometer.core.instrument.Gauge;
import io.micrometer.core.instrument.MeterRegistry;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.security.KeyStore;
import java.security.cert.Certificate;
import java.security.cert.CertificateFactory;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicBoolean;
import java.util.function.BiConsumer;
import javax.net.ssl.SSLContext;
import javax.net.ssl.TrustManagerFactory;
import org.eclipse.paho.client.mqttv3.IMqttDeliveryToken;
import org.eclipse.paho.client.mqttv3.MqttAsyncClient;
import org.eclipse.paho.client.mqttv3.MqttCallbackExtended;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.MqttException;
import org.eclipse.paho.client.mqttv3.MqttMessage;
import org.eclipse.paho.client.mqttv3.ScheduledExecutorPingSender;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * byre's one connection to the broker (MQTT 3.1.1, Paho). A persistent session (clean session off,
 * a stable client id) and QoS 1 subscriptions mean the broker keeps readings published while byre
 * was down. A last will marks the site offline. byre reconnects on its own with a short capped
 * backoff, so it is back within seconds of the broker's return.
 */
public final class MqttLink implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(MqttLink.class);

    static {
        PahoLog.install(); // before the client's classes load (each takes its logger once)
    }
    static final Duration FIRST_BACKOFF = Duration.ofMillis(250);
    static final Duration MAX_BACKOFF = Duration.ofSeconds(4);

    private final MqttSettings settings;
    private final String statusTopic;
    /**
     * Handles one message; runs {@code ack} when the message may be acknowledged to the broker. {@code ack} is null
     * when there is nothing to acknowledge (QoS 0), so that a store does not hurry a commit for it.
     */
    @FunctionalInterface
    public interface Handler {
        /** {@code retained}: the broker sent it because byre subscribed (a last known value), not as it was published. */
        void accept(String topic, byte[] payload, boolean retained, Runnable ack);
    }


    private final Map<String, Handler> subscriptions = new ConcurrentHashMap<>();
    /** Filters with wildcards, split into levels once: matching a message must not split every filter again. */
    private final List<Map.Entry<String[], Handler>> wildcardFilters = new java.util.concurrent.CopyOnWriteArrayList<>();
    private final List<Runnable> onConnect = new ArrayList<>();
    private final List<Runnable> onConnecting = new ArrayList<>();
    private final MqttAsyncClient client;
    private final ClientThreads threads;
    /** Acknowledgements go out only on the connection that delivered their message. */
    private final AckGate acks;
    private final AtomicBoolean closing = new AtomicBoolean();
    private final Object reconnectLock = new Object();
    private volatile boolean connected;
    private volatile boolean intakePaused;
    private volatile String lastError = "not connected yet";
    private Thread connector;
    private final Counter publishDropped;
    private final Counter connectionLosses;
    private final Counter invalidTopics;
    private final RateLimitedLog warnings;
    private final Ticker ticker;
    private final Quiet quiet = new Quiet();

    public MqttLink(MqttSettings settings, String site, MeterRegistry registry) throws MqttException {
        this(settings, site, registry, Ticker.SYSTEM);
    }

    public MqttLink(MqttSettings settings, String site, MeterRegistry registry, Ticker ticker) throws MqttException {
        this.settings = settings;
        this.ticker = ticker;
        this.warnings = new RateLimitedLog(LOG, Duration.ofHours(1), ticker::nanos);
        this.statusTopic = settings.publishPrefix() + "/" + site + "/status";
        this.threads = new ClientThreads(settings.clientId());
        this.client = new MqttAsyncClient(settings.connectUri(), settings.clientId(), new MemoryPersistence(),
                new ScheduledExecutorPingSender(threads), threads);
        client.setCallback(new Callback());
        client.setManualAcks(true);
        this.acks = new AckGate(client::isConnected, client::messageArrivedComplete);
        Gauge.builder("byre.mqtt.connected", this, l -> l.connected ? 1 : 0)
                .description("1 while connected to the broker").register(registry);
        publishDropped = Counter.builder("byre.mqtt.publish.dropped")
                .description("Derived-stream publications dropped while disconnected or saturated").register(registry);
        connectionLosses = Counter.builder("byre.mqtt.connection.lost").description("Broker connections lost").register(registry);
        invalidTopics = Counter.builder("byre.mqtt.messages.dropped").tag("reason", "invalid-topic")
                .description("Messages dropped because their topic is not a valid topic name").register(registry);
    }

    /** Adds a subscription (before {@link #start()}); the handler runs on the client's callback thread. */
    public void subscribe(String filter, BiConsumer<String, byte[]> handler) {
        subscribeAcked(filter, (topic, payload, retained, ack) -> {
            try {
                handler.accept(topic, payload);
            } finally {
                if (ack != null) ack.run();
            }
        });
    }

    /**
     * Adds a subscription whose messages are acknowledged only when the handler runs {@code ack} (QoS 1):
     * ingest acknowledges a reading once it is committed to the history, so a crash loses nothing the
     * broker was told is safe; the broker redelivers what was not acknowledged.
     */
    public void subscribeAcked(String filter, Handler handler) {
        subscriptions.put(filter, handler);
        if (filter.contains("+") || filter.contains("#")) wildcardFilters.add(Map.entry(TopicFilter.levels(filter), handler));
    }

    /** Runs after every (re)connection, e.g. to republish retained state. */
    public void onConnect(Runnable r) {
        onConnect.add(r);
    }

    /** The acknowledgement of one received message, null at QoS 0 (see {@link AckGate}). */
    private Runnable ackFor(MqttMessage message) {
        return acks.ackFor(message.getId(), message.getQos());
    }

    /**
     * Stops taking new messages (they stay unacknowledged with the broker, which delivers them again
     * after a restart) while what was taken is stored and acknowledged; then {@link #close()}.
     */
    public void pauseIntake() {
        intakePaused = true;
    }

    /** Runs just before every connection attempt (a session backlog may arrive before the attempt returns). */
    public void onConnecting(Runnable r) {
        onConnecting.add(r);
    }

    /** Starts connecting in the background; returns at once. */
    public void start() {
        quiet.heard(ticker.nanos());
        connector = new Thread(this::connectLoop, "mqtt-connect");
        connector.setDaemon(true);
        connector.start();
    }

    public boolean isConnected() {
        return connected;
    }

    public String lastError() {
        return lastError;
    }

    /**
     * Connected time since the last message arrived (or since {@link #start()}), summed over connections: time
     * without a connection does not count. A link that keeps connecting but hears nothing, for example because
     * the client stops reading after each connection, adds up here although each connection is short.
     */
    public Duration quietWhileConnected() {
        return Duration.ofNanos(quiet.nanos(ticker.nanos()));
    }

    /** Publishes without waiting; while disconnected the message is dropped and counted. */
    public boolean publish(String topic, String payload, int qos, boolean retained) {
        if (!connected) {
            publishDropped.increment();
            return false;
        }
        try {
            MqttMessage m = new MqttMessage(payload.getBytes(StandardCharsets.UTF_8));
            m.setQos(qos);
            m.setRetained(retained);
            client.publish(topic, m);
            return true;
        } catch (MqttException e) {
            publishDropped.increment();
            return false;
        }
    }

    /** Publishes and waits for the broker's acknowledgement (QoS 1); false on failure or timeout. */
    public boolean publishAndWait(String topic, String payload, long timeoutMs) {
        return publishAndWait(topic, payload, false, timeoutMs);
    }

    /** The same, with the retain flag: the broker then keeps the message for later subscribers. */
    public boolean publishAndWait(String topic, String payload, boolean retained, long timeoutMs) {
        if (!connected) return false;
        try {
            MqttMessage m = new MqttMessage(payload.getBytes(StandardCharsets.UTF_8));
            m.setQos(1);
            m.setRetained(retained);
            IMqttDeliveryToken t = client.publish(topic, m);
            t.waitForCompletion(timeoutMs);
            return t.isComplete() && t.getException() == null;
        } catch (MqttException e) {
            lastError = describe(e);
            return false;
        }
    }

    private void connectLoop() {
        Backoff backoff = new Backoff(ticker, FIRST_BACKOFF, MAX_BACKOFF);
        boolean warned = false;
        while (!closing.get()) {
            if (connected) {
                synchronized (reconnectLock) {
                    try {
                        // Asleep until the connection is lost (connectionLost clears the flag, then notifies under this
                        // lock, so no loss slips between the check and the wait) or close() interrupts: a timed wait
                        // woke this thread every second for nothing.
                        while (connected && !closing.get()) reconnectLock.wait();
                    } catch (InterruptedException e) {
                        return;
                    }
                }
                backoff.connected();
                continue;
            }
            try {
                acks.nextConnection();
                onConnecting.forEach(Runnable::run);
                client.connect(options()).waitForCompletion(10_000);
                if (!client.isConnected()) throw new MqttException(MqttException.REASON_CODE_CLIENT_TIMEOUT);
                // One SUBSCRIBE for every filter: one round trip, however many sensors, to a broker that may be
                // slow just after its own restart (reloading and saving its sessions).
                if (!subscriptions.isEmpty()) {
                    String[] filters = subscriptions.keySet().toArray(new String[0]);
                    int[] qos = new int[filters.length];
                    java.util.Arrays.fill(qos, settings.qos());
                    client.subscribe(filters, qos).waitForCompletion(10_000);
                }
                connected = true;
                quiet.connected(ticker.nanos());
                lastError = "";
                warned = false;
                LOG.info("connected to MQTT broker {} as {}", settings.connectUri(), settings.clientId());
                publish(statusTopic, "online", 1, true);
                for (Runnable r : onConnect) {
                    try {
                        r.run();
                    } catch (RuntimeException e) {
                        LOG.warn("after-connect task failed: {}", e.toString());
                    }
                }
            } catch (MqttException e) {
                lastError = describe(e);
                if (!warned) {
                    LOG.warn("cannot connect to MQTT broker {}: {}; retrying", settings.connectUri(), lastError);
                    warned = true;
                } else {
                    LOG.debug("still cannot connect to {}: {}", settings.connectUri(), lastError);
                }
                try {
                    if (client.isConnected()) client.disconnectForcibly(100, 100);
                } catch (MqttException ignored) {
                    // about to retry anyway
                }
                backoff.failed();
                try {
                    TimeUnit.NANOSECONDS.sleep(backoff.waitNanos());
                } catch (InterruptedException ie) {
                    return;
                }
            }
        }
    }

    private MqttConnectOptions options() throws MqttException {
        MqttConnectOptions o = new MqttConnectOptions();
        o.setMqttVersion(MqttConnectOptions.MQTT_VERSION_3_1_1);
        o.setCleanSession(false);
        o.setAutomaticReconnect(false);
        o.setKeepAliveInterval(20);
        o.setConnectionTimeout(10);
        o.setMaxInflight(1000);
        o.setWill(statusTopic, "offline".getBytes(StandardCharsets.UTF_8), 1, true);
        if (settings.username() != null) o.setUserName(settings.username());
        if (settings.password() != null) o.setPassword(settings.password().reveal().toCharArray());
        // Both kinds of socket pass what they receive through a PublishTopicGuard (a topic the client cannot decode
        // would stop its reading thread). No per-subscription listeners: the client would match their filters
        // against each topic and refuse the guard's mark.
        if (settings.connectUri().startsWith("ssl://")) {
            o.setSocketFactory(new GuardedSslSocketFactory(settings.caFile() != null ? trustingOnly(Path.of(settings.caFile()))
                    : (javax.net.ssl.SSLSocketFactory) javax.net.ssl.SSLSocketFactory.getDefault()));
        } else if (settings.caFile() != null) {
            o.setSocketFactory(trustingOnly(Path.of(settings.caFile())));
        } else {
            o.setSocketFactory(new BufferedSocketFactory());
        }
        return o;
    }

    /** A TLS socket factory that trusts exactly the CA certificate(s) in the given PEM file. */
    static javax.net.ssl.SSLSocketFactory trustingOnly(Path caPem) throws MqttException {
        try (InputStream in = new java.io.ByteArrayInputStream(byre.config.SmallFile.read(caPem, byre.config.SmallFile.CONFIG_MAX_BYTES))) {
            KeyStore ks = KeyStore.getInstance(KeyStore.getDefaultType());
            ks.load(null, null);
            int i = 0;
            for (Certificate c : CertificateFactory.getInstance("X.509").generateCertificates(in)) {
                ks.setCertificateEntry("ca" + i++, c);
            }
            TrustManagerFactory tmf = TrustManagerFactory.getInstance(TrustManagerFactory.getDefaultAlgorithm());
            tmf.init(ks);
            SSLContext ctx = SSLContext.getInstance("TLS");
            ctx.init(null, tmf.getTrustManagers(), null);
            return ctx.getSocketFactory();
        } catch (Exception e) {
            throw new MqttException(MqttException.REASON_CODE_SSL_CONFIG_ERROR, e);
        }
    }

    /** A short reason for an MQTT failure, without any credentials. */
    static String describe(MqttException e) {
        switch (e.getReasonCode()) {
            case MqttException.REASON_CODE_FAILED_AUTHENTICATION: return "bad user name or password (broker refused authentication)";
            case MqttException.REASON_CODE_NOT_AUTHORIZED: return "not authorised by the broker";
            case MqttException.REASON_CODE_INVALID_CLIENT_ID: return "client id rejected by the broker";
            case MqttException.REASON_CODE_BROKER_UNAVAILABLE: return "broker unavailable";
            case MqttException.REASON_CODE_SERVER_CONNECT_ERROR:
                Throwable c = e.getCause();
                return "cannot reach the broker" + (c == null ? "" : " (" + c.getClass().getSimpleName()
                        + (c.getMessage() == null ? "" : ": " + c.getMessage()) + ")");
            case MqttException.REASON_CODE_SSL_CONFIG_ERROR: return "TLS set-up failed: " + e.getCause();
            default: return e.getMessage() + " (code " + e.getReasonCode() + ")";
        }
    }

    @Override
    public void close() {
        if (!closing.compareAndSet(false, true)) return;
        if (connector != null) connector.interrupt();
        try {
            if (client.isConnected()) {
                // A clean goodbye does not trigger the will, so say offline ourselves.
                MqttMessage off = new MqttMessage("offline".getBytes(StandardCharsets.UTF_8));
                off.setQos(1);
                off.setRetained(true);
                client.publish(statusTopic, off).waitForCompletion(2000);
                client.disconnect(2000).waitForCompletion(3000);
            }
        } catch (MqttException e) {
            LOG.debug("disconnect: {}", e.toString());
        }
        try {
            client.close(true);
        } catch (MqttException e) {
            LOG.debug("close: {}", e.toString());
        }
        threads.shutdownNow();
        connected = false;
        quiet.lost(ticker.nanos());
        if (connector != null) {
            try {
                connector.join(2000);
            } catch (InterruptedException ignored) {
                Thread.currentThread().interrupt();
            }
        }
    }

    private final class Callback implements MqttCallbackExtended {
        @Override
        public void connectComplete(boolean reconnect, String serverURI) {
            // connection set-up is driven by connectLoop
        }

        @Override
        public void connectionLost(Throwable cause) {
            connected = false;
            quiet.lost(ticker.nanos());
            acks.nextConnection();
            connectionLosses.increment();
            lastError = "connection lost: " + (cause == null ? "unknown" : cause.getMessage());
            if (!closing.get()) LOG.warn("lost the MQTT broker connection ({}); reconnecting", cause == null ? "?" : cause.getMessage());
            synchronized (reconnectLock) {
                reconnectLock.notifyAll();
            }
        }

        @Override
        public void messageArrived(String topic, MqttMessage message) {
            // A topic never holds a wildcard, so a filter equal to it is an exact subscription: one hash lookup.
            if (intakePaused) return; // not acknowledged: the broker delivers it again after the restart
            quiet.heard(ticker.nanos());
            if (topic.indexOf('#') >= 0 || topic.indexOf('+') >= 0) {
                dropInvalidTopic(topic, message);
                return;
            }
            Handler handler = subscriptions.get(topic);
            if (handler == null && !wildcardFilters.isEmpty()) {
                String[] levels = TopicFilter.levels(topic);
                for (Map.Entry<String[], Handler> f : wildcardFilters) {
                    if (TopicFilter.matches(f.getKey(), levels)) {
                        handler = f.getValue();
                        break;
                    }
                }
            }
            Runnable ack = ackFor(message);
            if (handler == null) {
                if (ack != null) ack.run();
                return;
            }
            try {
                handler.accept(topic, message.getPayload(), message.isRetained(), ack);
            } catch (RuntimeException e) {
                LOG.error("handler for {} failed on a message: {}", topic, e.toString(), e);
                // If the handler already ran it, or a commit runs it later, AckGate still sends it once.
                if (ack != null) ack.run();
            }
        }

        /**
         * A topic name holding a wildcard: the mark of {@link PublishTopicGuard} (bytes the client could not decode)
         * or a broker passing on a name it should have refused. Dropped, counted, logged once an hour per topic,
         * and acknowledged, so that the broker does not deliver it again.
         */
        private void dropInvalidTopic(String topic, MqttMessage message) {
            invalidTopics.increment();
            warnings.warn("invalid-topic:" + topic, "dropped a message whose topic is not a valid topic name (a NUL, a control character,"
                    + " bytes that are not UTF-8, or a wildcard; shown as #): '" + topic + "'; fix the publisher");
            Runnable ack = ackFor(message);
            if (ack != null) ack.run();
        }

        @Override
        public void deliveryComplete(IMqttDeliveryToken token) {
            // nothing to do: publications are fire-and-forget or awaited by the caller
        }
    }

    /** Connected time without a message, summed over connections (see {@link #quietWhileConnected()}). */
    static final class Quiet {
        private volatile long heardNanos;
        private long foldedHeard;
        private long beforeNanos;
        private long fromNanos;
        private boolean on;

        /** On every message: one volatile write, the rest is worked out when asked. */
        void heard(long now) {
            heardNanos = now;
        }

        synchronized void connected(long now) {
            fold();
            fromNanos = now;
            on = true;
        }

        synchronized void lost(long now) {
            fold();
            if (on) beforeNanos += Math.max(0, now - fromNanos);
            on = false;
        }

        synchronized long nanos(long now) {
            fold();
            return beforeNanos + (on ? Math.max(0, now - fromNanos) : 0);
        }

        /** A message since the last look ends the quiet: count from it. */
        private void fold() {
            long h = heardNanos;
            if (h != foldedHeard) {
                foldedHeard = h;
                beforeNanos = 0;
                if (fromNanos < h) fromNanos = h;
            }
        }
    }
}
