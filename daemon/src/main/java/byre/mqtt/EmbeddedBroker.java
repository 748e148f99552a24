package byre.mqtt;

import io.moquette.broker.Server;
import io.moquette.broker.config.MemoryConfig;
import java.io.IOException;
import java.net.InetSocketAddress;
import java.net.ServerSocket;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Properties;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The MQTT 3.1.1 broker inside byre for {@code mqtt.broker: embedded}: the demo, tests and tiny
 * installs. It listens only on the configured address, keeps nothing on disk, and never calls out
 * (the library's usage telemetry is on by default and is switched off here). Sensors should publish
 * QoS 1 to it: it drops QoS 0 under bursts.
 */
public final class EmbeddedBroker implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(EmbeddedBroker.class);

    private final Server server = new Server();
    private final String host;
    private final int port;
    private final Path dataDir;

    private EmbeddedBroker(String host, int port, Path dataDir) {
        this.host = host;
        this.port = port;
        this.dataDir = dataDir;
    }

    /** Starts a broker on host:port and counts its errors in {@code byre.broker.errors}. */
    public static EmbeddedBroker start(String host, int port, io.micrometer.core.instrument.MeterRegistry registry) throws IOException {
        io.micrometer.core.instrument.FunctionCounter.builder("byre.broker.errors", BrokerLog.class, b -> BrokerLog.errors())
                .description("Errors of the embedded broker (oversized or malformed packets, bad topics)").register(registry);
        return start(host, port);
    }

    /** Starts a broker on host:port; port 0 picks a free port. */
    public static EmbeddedBroker start(String host, int port) throws IOException {
        BrokerLog.install();
        int chosen = port == 0 ? freePort(host) : port;
        Path dataDir = Files.createTempDirectory("byre-broker");
        EmbeddedBroker b = new EmbeddedBroker(host, chosen, dataDir);
        Properties p = new Properties();
        p.setProperty("host", host);
        p.setProperty("port", Integer.toString(chosen));
        p.setProperty("websocket_port", "disabled");
        p.setProperty("allow_anonymous", "true");
        p.setProperty("telemetry_enabled", "false");
        p.setProperty("persistence_enabled", "false");
        p.setProperty("data_path", dataDir.toString() + "/");
        p.setProperty("netty.mqtt.message_size", "8192");
        b.server.startServer(new MemoryConfig(p));
        LOG.info("embedded MQTT broker listening on {}:{}", host, chosen);
        return b;
    }

    public String uri() {
        return "tcp://" + host + ":" + port;
    }

    public int port() {
        return port;
    }

    @Override
    public void close() {
        server.stopServer();
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
}
