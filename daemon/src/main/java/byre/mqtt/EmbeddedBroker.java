package byre.mqtt;

import byre.config.Addresses;
import byre.log.RateLimitedLog;
import io.micrometer.core.instrument.Counter;
import io.micrometer.core.instrument.MeterRegistry;
import io.moquette.broker.Server;
import io.moquette.broker.config.MemoryConfig;
import io.moquette.broker.security.IAuthorizatorPolicy;
import io.moquette.broker.subscriptions.Topic;
import java.io.IOException;
import java.io.InputStream;
import java.io.OutputStream;
import java.net.InetSocketAddress;
import java.net.ServerSocket;
import java.net.Socket;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.List;
import java.util.Properties;
import java.util.Set;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.atomic.AtomicBoolean;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The MQTT 3.1.1 broker inside byre for {@code mqtt.broker: embedded}: the demo, tests and trying byre on one
 * machine. It has no users, so it listens on loopback only (anything else is refused), keeps nothing on disk (a
 * {@code kill -9} of byre loses what it held in memory), and never calls out (the library's usage telemetry is on
 * by default and is switched off here). Sensors should publish QoS 1 to it: it drops QoS 0 under bursts.
 * <ul>
 * <li>A client may connect with an empty client id and a clean session (MQTT 3.1.1 section 3.1.3.1), as
 *     {@code mosquitto_pub} and {@code mosquitto_sub} do.</li>
 * <li>A topic that is not valid UTF-8, or holds U+0000 or another control character (section 1.5.3), is not
 *     forwarded, and its sender is disconnected; the broker library would otherwise pass it on with replacement
 *     characters.</li>
 * <li>Started {@linkplain #startGated gated}, it accepts no client on its address until {@link #open()}: the
 *     daemon connects to a private loopback port of the broker, subscribes, and then opens the address, so no QoS 1
 *     reading is acknowledged to a sensor before byre can receive it. (Refusing the sensors' publications instead
 *     would not do: the library forwards a publication sent again with the DUP flag only to subscribers that failed
 *     the first time, so the resent reading would be acknowledged and dropped.) Until then sensors wait in the
 *     listen queue; afterwards their connections are relayed to the private port.</li>
 * </ul>
 */
public final class EmbeddedBroker implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(EmbeddedBroker.class);

    private final Server server = new Server();
    private final String host;
    private final int port;
    private final int ownPort;
    private final Path dataDir;
    private final Policy policy;
    private final Relay relay;

    private EmbeddedBroker(String host, int port, int ownPort, Path dataDir, Policy policy, Relay relay) {
        this.host = host;
        this.port = port;
        this.ownPort = ownPort;
        this.dataDir = dataDir;
        this.policy = policy;
        this.relay = relay;
    }

    /** Starts a broker that accepts clients on host:port (loopback only) at once; port 0 picks a free port. */
    public static EmbeddedBroker start(String host, int port) throws IOException {
        return start(host, port, false, null);
    }

    /** As {@link #start(String, int)}, counting the broker's errors and refused topics in {@code registry}. */
    public static EmbeddedBroker start(String host, int port, MeterRegistry registry) throws IOException {
        return start(host, port, false, registry);
    }

    /**
     * Starts a broker whose address host:port (loopback only; bound now, so a port in use fails here) accepts clients
     * only after {@link #open()}; the daemon connects first to {@link #ownPort()}. Refused topics are counted in
     * {@code registry} when one is given.
     */
    public static EmbeddedBroker startGated(String host, int port, MeterRegistry registry) throws IOException {
        return start(host, port, true, registry);
    }

    private static EmbeddedBroker start(String host, int port, boolean gated, MeterRegistry registry) throws IOException {
        if (!Addresses.isLoopback(host)) {
            throw new IllegalArgumentException("the embedded broker listens on loopback addresses only (127.0.0.1, ::1), not " + host);
        }
        BrokerLog.install();
        if (registry != null) {
            io.micrometer.core.instrument.FunctionCounter.builder("byre.broker.errors", BrokerLog.class, x -> BrokerLog.errors())
                    .description("Errors of the embedded broker (oversized or malformed packets, bad topics)").register(registry);
        }
        Relay relay = gated ? new Relay(host, port) : null;
        int chosen = gated ? relay.port() : port == 0 ? freePort(host) : port;
        int own = gated ? freePort(host) : chosen;
        Path dataDir = Files.createTempDirectory("byre-broker");
        Policy policy = new Policy(registry);
        EmbeddedBroker b = new EmbeddedBroker(host, chosen, own, dataDir, policy, relay);
        policy.server = b.server;
        Properties p = new Properties();
        p.setProperty("host", host);
        p.setProperty("port", Integer.toString(own));
        p.setProperty("websocket_port", "disabled");
        p.setProperty("allow_anonymous", "true");
        p.setProperty("allow_zero_byte_client_id", "true");
        p.setProperty("telemetry_enabled", "false");
        p.setProperty("persistence_enabled", "false");
        p.setProperty("data_path", dataDir.toString() + "/");
        p.setProperty("netty.mqtt.message_size", "8192");
        try {
            b.server.startServer(new MemoryConfig(p), List.of(), null, null, policy);
        } catch (IOException | RuntimeException e) {
            if (relay != null) relay.close();
            b.deleteDataDir();
            throw e;
        }
        LOG.info("embedded MQTT broker listening on {}:{}{}", host, chosen, gated ? " (clients accepted once byre has subscribed)" : "");
        return b;
    }

    /** Accepts clients on the broker's address from now on (a gated broker; nothing happens on an open one or twice). */
    public void open() {
        if (relay != null) relay.open(ownPort);
    }

    /** The port the daemon's own client connects to: a private one while gated, else {@link #port()}. */
    public int ownPort() {
        return ownPort;
    }

    public String uri() {
        return "tcp://" + host + ":" + port;
    }

    public int port() {
        return port;
    }

    @Override
    public void close() {
        if (relay != null) relay.close();
        policy.disconnects.shutdownNow();
        server.stopServer();
        deleteDataDir();
    }

    private void deleteDataDir() {
        try (var walk = Files.walk(dataDir)) {
            walk.sorted(java.util.Comparator.reverseOrder()).forEach(p -> p.toFile().delete());
        } catch (IOException ignored) {
            // a temporary folder left behind is harmless
        }
    }

    /** A free TCP port on the given address (the OS picks one). */
    public static int freePort(String host) throws IOException {
        try (ServerSocket s = new ServerSocket()) {
            s.setReuseAddress(true);
            s.bind(new InetSocketAddress(host, 0));
            return s.getLocalPort();
        }
    }

    /**
     * Whether a topic may pass: MQTT 3.1.1 section 1.5.3 forbids U+0000 and ill-formed UTF-8 and advises against
     * control characters. The broker library decodes ill-formed UTF-8 to U+FFFD, so that character is refused too
     * (no sensor topic uses it).
     */
    static boolean validTopic(String topic) {
        if (topic == null || topic.isEmpty()) return false;
        for (int i = 0; i < topic.length(); i++) {
            char c = topic.charAt(i);
            if (c < 0x20 || (c >= 0x7f && c <= 0x9f) || c == '\uFFFD' || Character.isSurrogate(c) && !validSurrogate(topic, i)) return false;
        }
        return true;
    }

    private static boolean validSurrogate(String s, int i) {
        char c = s.charAt(i);
        if (Character.isHighSurrogate(c)) return i + 1 < s.length() && Character.isLowSurrogate(s.charAt(i + 1));
        return i > 0 && Character.isHighSurrogate(s.charAt(i - 1));
    }

    /** Shown in a log line: control and non-ASCII characters as \\uXXXX, so a topic cannot forge a line. */
    static String escaped(String topic) {
        StringBuilder sb = new StringBuilder();
        for (int i = 0; i < topic.length() && i < 200; i++) {
            char c = topic.charAt(i);
            if (c < 0x20 || c > 0x7e) {
                sb.append(String.format("\\u%04x", (int) c));
            } else {
                sb.append(c);
            }
        }
        return sb.toString();
    }

    /** Topic checks, asked by the broker library for every publication and subscription. */
    private static final class Policy implements IAuthorizatorPolicy {
        private final RateLimitedLog warnings = new RateLimitedLog(LOG, Duration.ofMinutes(1), System::nanoTime);
        private final Counter badTopics;
        volatile Server server;
        /** One thread for disconnects, off the broker's own threads (the library routes them through the session's loop). */
        final java.util.concurrent.ExecutorService disconnects = java.util.concurrent.Executors.newSingleThreadExecutor(r -> {
            Thread t = new Thread(r, "broker-disconnect");
            t.setDaemon(true);
            return t;
        });

        Policy(MeterRegistry registry) {
            this.badTopics = registry == null ? null : Counter.builder("byre.broker.refused").tag("reason", "bad-topic")
                    .description("Messages the embedded broker refused").register(registry);
        }

        @Override
        public boolean canWrite(Topic topic, String user, String client) {
            return allowed(topic, client);
        }

        @Override
        public boolean canRead(Topic topic, String user, String client) {
            return allowed(topic, client);
        }

        /** The same check for publishing and subscribing: a bad topic is refused and its client disconnected. */
        private boolean allowed(Topic topic, String client) {
            String t = topic.toString();
            if (validTopic(t)) return true;
            refuse(t, client);
            return false;
        }

        private void refuse(String topic, String client) {
            if (badTopics != null) badTopics.increment();
            warnings.warn("bad-topic", "embedded broker: client " + escaped(client) + " used a topic that is not valid UTF-8 or holds "
                    + "control characters (" + escaped(topic) + "); not forwarded, client disconnected");
            disconnectLater(client);
        }

        private void disconnectLater(String client) {
            Server s = server;
            if (s == null) return;
            try {
                disconnects.execute(() -> {
                    try {
                        s.disconnectClient(client);
                    } catch (RuntimeException e) {
                        LOG.debug("embedded broker: disconnecting {} failed: {}", escaped(client), e.toString());
                    }
                });
            } catch (java.util.concurrent.RejectedExecutionException closing) {
                // the broker is stopping: every client goes anyway
            }
        }
    }

    /**
     * The gated broker's address: bound at start, accepting from {@link #open(int)} on; each client connection is
     * relayed byte for byte to the broker's private port by two threads. Closing either side closes both.
     */
    private static final class Relay implements AutoCloseable {
        /** Far more than a one-machine trial has; a client beyond it is closed at once. */
        private static final int MAX_CLIENTS = 500;
        private final ServerSocket listener;
        private final Set<Socket> open = ConcurrentHashMap.newKeySet();
        private final AtomicBoolean started = new AtomicBoolean();

        Relay(String host, int port) throws IOException {
            listener = new ServerSocket();
            listener.setReuseAddress(true);
            listener.bind(new InetSocketAddress(host, port), 128);
        }

        int port() {
            return listener.getLocalPort();
        }

        void open(int brokerPort) {
            if (!started.compareAndSet(false, true)) return;
            Thread t = new Thread(() -> acceptLoop(brokerPort), "broker-relay");
            t.setDaemon(true);
            t.start();
        }

        private void acceptLoop(int brokerPort) {
            while (!listener.isClosed()) {
                Socket client;
                try {
                    client = listener.accept();
                } catch (IOException e) {
                    return; // closed
                }
                if (open.size() >= 2 * MAX_CLIENTS) {
                    LOG.warn("embedded broker: more than {} clients; refusing one more", MAX_CLIENTS);
                    quietly(client);
                    continue;
                }
                try {
                    client.setTcpNoDelay(true);
                    Socket broker = new Socket(listener.getInetAddress(), brokerPort);
                    broker.setTcpNoDelay(true);
                    open.add(client);
                    open.add(broker);
                    pump(client, broker);
                    pump(broker, client);
                } catch (IOException e) {
                    LOG.warn("embedded broker: cannot relay a client: {}", e.toString());
                    quietly(client);
                }
            }
        }

        private void pump(Socket from, Socket to) {
            Thread t = new Thread(() -> {
                byte[] buf = new byte[8192];
                try (InputStream in = from.getInputStream(); OutputStream out = to.getOutputStream()) {
                    for (int n; (n = in.read(buf)) >= 0; ) {
                        out.write(buf, 0, n);
                    }
                } catch (IOException ignored) {
                    // one side has gone: close both below
                } finally {
                    quietly(from);
                    quietly(to);
                    open.remove(from);
                    open.remove(to);
                }
            }, "broker-relay-pump");
            t.setDaemon(true);
            t.start();
        }

        private static void quietly(Socket s) {
            try {
                s.close();
            } catch (IOException ignored) {
                // closing anyway
            }
        }

        @Override
        public void close() {
            try {
                listener.close();
            } catch (IOException ignored) {
                // closing anyway
            }
            open.forEach(Relay::quietly);
            open.clear();
        }
    }
}
