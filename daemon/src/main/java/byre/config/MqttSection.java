package byre.config;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.Map;
import java.util.Set;
import java.util.function.Function;
import org.snakeyaml.engine.v2.nodes.Node;

/** Reads and checks {@code mqtt:}: the broker, byre's login to it, and what byre publishes. */
final class MqttSection {
    static final Set<String> KEYS = NodeReader.ordered("broker", "listen", "client-id", "username", "password-file",
            "password-env", "publish-prefix", "qos", "ca-file", "publish-events", "publish-every", "accept-acks");

    private MqttSection() {}

    /** {@code environment} looks up {@code password-env}; the client id defaults to {@code byre-<site>}. */
    static MqttSettings read(NodeReader r, Node node, String site, Function<String, String> environment) {
        Map<String, Node> m = node == null ? Map.of() : r.mapping(node, KEYS, "mqtt");
        String broker = r.string(m.get("broker"), "mqtt.broker", "embedded");
        if (!broker.equals("embedded") && !broker.matches("(tcp|ssl)://[^\\s/:]+(:\\d+)?")) {
            r.problem(m.get("broker"), "mqtt.broker must be 'embedded', tcp://host:port or ssl://host:port, not '" + broker + "'");
        }
        String listen = r.string(m.get("listen"), "mqtt.listen", "127.0.0.1:1883");
        NodeReader.HostPort hp = r.hostPort(m.get("listen"), "mqtt.listen", listen);
        if (broker.equals("embedded") && !Addresses.isLoopback(hp.host())) {
            r.problem(m.get("listen") != null ? m.get("listen") : m.get("broker"), "mqtt.listen '" + listen + "': the embedded broker "
                    + "listens on loopback only (127.0.0.1 or ::1); it has no users and is for the demo, tests and one-machine "
                    + "trials. For sensors on the farm network use the barn's mosquitto (mqtt.broker: tcp://127.0.0.1:1883)");
        }
        String clientId = r.string(m.get("client-id"), "mqtt.client-id", "byre-" + site);
        String username = r.string(m.get("username"), "mqtt.username", null);
        Secret password = r.secretFile(m.get("password-file"), "mqtt.password-file");
        String passwordEnv = r.string(m.get("password-env"), "mqtt.password-env", null);
        if (password == null && passwordEnv != null) {
            String v = environment.apply(passwordEnv);
            if (v == null) {
                r.problem(m.get("password-env"), "mqtt.password-env names $" + passwordEnv + ", which is not set");
            } else {
                password = new Secret(v, "$" + passwordEnv);
            }
        }
        String prefix = r.string(m.get("publish-prefix"), "mqtt.publish-prefix", "byre");
        if (prefix.contains("+") || prefix.contains("#")) {
            r.problem(m.get("publish-prefix"), "mqtt.publish-prefix may not contain MQTT wildcards");
        }
        int qos = r.integer(m.get("qos"), "mqtt.qos", 1);
        if (qos != 0 && qos != 1) r.problem(m.get("qos"), "mqtt.qos must be 0 or 1 (1 keeps readings across restarts)");
        String caFile = r.string(m.get("ca-file"), "mqtt.ca-file", null);
        if (caFile != null) {
            Path p = r.resolve(caFile);
            try {
                SmallFile.regular(p);
                if (!Files.isReadable(p)) r.problem(m.get("ca-file"), "mqtt.ca-file " + p + " cannot be read");
            } catch (SmallFile.Refused e) {
                r.problem(m.get("ca-file"), "mqtt.ca-file: " + e.getMessage());
            } catch (IOException e) {
                r.problem(m.get("ca-file"), "mqtt.ca-file " + p + " cannot be read (" + SmallFile.describe(e) + ")");
            }
            caFile = p.toString();
        }
        boolean events = r.bool(m.get("publish-events"), "mqtt.publish-events", true);
        Duration every = r.duration(m.get("publish-every"), "mqtt.publish-every", MqttSettings.DEFAULT_PUBLISH_EVERY);
        boolean acceptAcks = r.bool(m.get("accept-acks"), "mqtt.accept-acks", false);
        return new MqttSettings(broker, hp.host(), hp.port(), clientId, username, password, prefix, qos, caFile,
                events, every, acceptAcks);
    }
}
