package byre.testing;

import byre.config.ByreConfig;
import byre.config.ConfigException;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * The configuration file of a byre under test: a barn's (site larkmoor, its sensors and zones) or a central byre's
 * (site hub, the sites it follows), each with a command channel {@code office} that runs /bin/true, for rules to
 * notify. A test states only what it varies. The lines always come in the same order, so that a test can name the
 * line and column of a value.
 */
public final class ConfigYaml {
    /** The centre's critical watch for a site that says it went offline; it notifies {@code office}. */
    public static final String SITE_DOWN = """
            watch site-down
              raise when @sites.online == 0
              clear when @sites.online == 1
              level critical
              notify office
            """;

    private final String site;
    private String timezone;
    private String broker;
    private String clientId;
    private final StringBuilder mqttOptions = new StringBuilder();
    private final List<String> sensors = new ArrayList<>();
    private final Map<String, List<String>> zones = new LinkedHashMap<>();
    private String defaults;
    private final Map<String, String> sites = new LinkedHashMap<>();
    private String rules;
    private String history;
    private String admin;
    private String page;

    private ConfigYaml(String site, String clientId, String rules, String history) {
        this.site = site;
        this.clientId = clientId;
        this.rules = rules;
        this.history = history;
    }

    /** A barn's byre: site larkmoor, client id byre-larkmoor, rules in barn-rules, history in barn.db. */
    public static ConfigYaml barn() {
        return new ConfigYaml("larkmoor", "byre-larkmoor", "barn-rules", "barn.db");
    }

    /** A central byre: site hub, client id byre-hub, rules in central-rules, history in central.db. */
    public static ConfigYaml centre() {
        return new ConfigYaml("hub", "byre-hub", "central-rules", "central.db");
    }

    public ConfigYaml timezone(String zoneId) {
        timezone = zoneId;
        return this;
    }

    /** byre runs the broker itself, listening on 127.0.0.1:{@code port}. */
    public ConfigYaml embeddedBroker(int port) {
        broker = "embedded, listen: 127.0.0.1:" + port;
        return this;
    }

    /** byre connects to a broker at tcp://127.0.0.1:{@code port}. */
    public ConfigYaml broker(int port) {
        broker = "tcp://127.0.0.1:" + port;
        return this;
    }

    public ConfigYaml clientId(String id) {
        clientId = id;
        return this;
    }

    /** Text that ends the {@code mqtt:} mapping after the client id, as written (", key: value, ..."). */
    public ConfigYaml mqttOptions(String text) {
        mqttOptions.append(text);
        return this;
    }

    /** The site's own byre takes acknowledgements made at the centre. */
    public ConfigYaml acceptAcks() {
        return mqttOptions(", accept-acks: true");
    }

    public ConfigYaml sensor(String id, String topic, String quantity) {
        sensors.add(id + ": { topic: " + topic + ", quantity: " + quantity + " }");
        return this;
    }

    public ConfigYaml zone(String id, String... sensorIds) {
        zones.put(id, List.of(sensorIds));
        return this;
    }

    /** {@code central.discover}, with the settings of {@code central.defaults} as written ("zones: [...], ..."). */
    public ConfigYaml discover(String defaultSettings) {
        defaults = defaultSettings;
        return this;
    }

    /** A site of {@code central.sites}, with its settings as written ("zones: [...], groups: [...]"). */
    public ConfigYaml site(String id, String settings) {
        sites.put(id, settings);
        return this;
    }

    /** The rules folder, relative to the configuration file. */
    public ConfigYaml rules(String folder) {
        rules = folder;
        return this;
    }

    public ConfigYaml history(String path) {
        history = path;
        return this;
    }

    public ConfigYaml admin(int port) {
        admin = "listen: 127.0.0.1:" + port;
        return this;
    }

    public ConfigYaml admin(int port, String tokenFile) {
        admin = "listen: 127.0.0.1:" + port + ", token-file: " + tokenFile;
        return this;
    }

    public ConfigYaml page(int port) {
        page = "listen: 127.0.0.1:" + port;
        return this;
    }

    public String text() {
        if (broker == null) throw new IllegalStateException("no broker: call embeddedBroker(port) or broker(port)");
        StringBuilder y = new StringBuilder("site: " + site + "\n");
        if (timezone != null) y.append("timezone: ").append(timezone).append('\n');
        y.append("mqtt: { broker: ").append(broker).append(", client-id: ").append(clientId).append(mqttOptions).append(" }\n");
        if (!sensors.isEmpty()) {
            y.append("sensors:\n");
            for (String s : sensors) y.append("  ").append(s).append('\n');
        }
        if (!zones.isEmpty()) {
            y.append("zones:\n");
            zones.forEach((id, ids) -> y.append("  ").append(id).append(": { sensors: [").append(String.join(", ", ids)).append("] }\n"));
        }
        if (defaults != null || !sites.isEmpty()) {
            y.append("central:\n");
            if (defaults != null) y.append("  discover: true\n  defaults: { ").append(defaults).append(" }\n");
            if (!sites.isEmpty()) y.append("  sites:\n");
            sites.forEach((id, settings) -> y.append("    ").append(id).append(": { ").append(settings).append(" }\n"));
        }
        y.append("notify:\n  office: { type: command, argv: [/bin/true] }\n");
        y.append("rules: ").append(rules).append('\n');
        y.append("history: { path: ").append(history).append(" }\n");
        if (admin != null) y.append("admin: { ").append(admin).append(" }\n");
        if (page != null) y.append("page: { ").append(page).append(" }\n");
        return y.toString();
    }

    /** Parsed as if read from {@code fileName} in {@code dir}, with no environment variables. */
    public ByreConfig parse(String fileName, Path dir) throws ConfigException {
        return Configs.parse(fileName, text(), dir, n -> null);
    }
}
