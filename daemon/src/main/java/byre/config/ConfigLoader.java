package byre.config;

import byre.units.Dimension;
import byre.units.Quantity;
import byre.units.Suggest;
import byre.units.Unit;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.DateTimeException;
import java.time.Duration;
import java.time.ZoneId;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.Set;
import java.util.function.Function;
import org.snakeyaml.engine.v2.api.LoadSettings;
import org.snakeyaml.engine.v2.api.lowlevel.Compose;
import org.snakeyaml.engine.v2.exceptions.MarkedYamlEngineException;
import org.snakeyaml.engine.v2.exceptions.YamlEngineException;
import org.snakeyaml.engine.v2.nodes.MappingNode;
import org.snakeyaml.engine.v2.nodes.Node;
import org.snakeyaml.engine.v2.nodes.SequenceNode;

/**
 * Reads the YAML configuration (README, Configuration) and checks all of it before anything starts,
 * collecting every problem as {@code file:line: message}. Secrets are read from the files or
 * environment variables the configuration names; their values never enter a message.
 */
public final class ConfigLoader {
    static final Set<String> TOP_KEYS = NodeReader.ordered("site", "timezone", "units", "mqtt", "sensors", "zones", "notify",
            "rules", "history", "admin", "digest", "self-alerts", "page", "central");
    static final Set<String> CENTRAL_KEYS = NodeReader.ordered("sites");
    static final Set<String> SITE_KEYS = NodeReader.ordered("zones", "groups", "max-age");
    static final Set<String> DIGEST_KEYS = NodeReader.ordered("at", "notify");
    static final Set<String> SELF_ALERT_KEYS = NodeReader.ordered("notify", "channel-failing-after");
    static final Set<String> MQTT_KEYS = NodeReader.ordered("broker", "listen", "client-id", "username", "password-file",
            "password-env", "publish-prefix", "qos", "ca-file", "publish-events", "publish-every", "accept-acks");
    static final Set<String> SENSOR_KEYS = NodeReader.ordered("topic", "quantity", "unit", "payload", "time", "id-level", "max-ids");
    static final Set<String> ZONE_KEYS = NodeReader.ordered("groups", "sensors", "elevation", "psychrometer", "max-age", "thi");
    static final Set<String> HISTORY_KEYS = NodeReader.ordered("path", "keep-raw", "keep-minute", "keep-hour", "commit-every");
    static final Set<String> ADMIN_KEYS = NodeReader.ordered("listen", "token-file");
    static final Set<String> PAGE_KEYS = NodeReader.ordered("listen", "base-url", "link-key-file", "link-valid", "reading");
    /** Keys every channel has, whatever its kind. */
    static final Set<String> CHANNEL_COMMON_KEYS = NodeReader.ordered("type", "rate-limit", "give-up");
    static final List<String> THI_VARIANTS = java.util.Arrays.stream(byre.climate.ThiVariant.values()).map(byre.climate.ThiVariant::id).toList();

    private final String fileName;
    private final Function<String, String> environment;
    private final List<ChannelType<?>> channelTypes;
    private final NodeReader r;

    private ConfigLoader(String fileName, Path baseDir, Function<String, String> environment, List<? extends ChannelType<?>> channelTypes) {
        this.fileName = fileName;
        this.r = new NodeReader(fileName, baseDir);
        this.environment = environment;
        this.channelTypes = List.copyOf(channelTypes);
    }

    /** Loads and validates a configuration file, with byre's channel kinds. */
    public static ByreConfig load(Path file) throws ConfigException {
        return load(file, byre.notify.ChannelTypes.ALL);
    }

    /** Loads and validates a configuration file; {@code channelTypes} are the kinds a channel's {@code type:} may name. */
    public static ByreConfig load(Path file, List<? extends ChannelType<?>> channelTypes) throws ConfigException {
        String text;
        try {
            text = new String(SmallFile.read(file, SmallFile.CONFIG_MAX_BYTES), StandardCharsets.UTF_8);
        } catch (SmallFile.Refused e) {
            throw new ConfigException(List.of(new ConfigProblem(file.toString(), 0, "cannot read the configuration: " + e.getMessage())));
        } catch (IOException e) {
            throw new ConfigException(List.of(new ConfigProblem(file.toString(), 0,
                    "cannot read the configuration: " + SmallFile.describe(e))));
        }
        Path dir = file.toAbsolutePath().getParent();
        return parse(file.toString(), text, dir, System::getenv, channelTypes);
    }

    /** Validates configuration text, with byre's channel kinds; relative paths are resolved against {@code baseDir}. */
    public static ByreConfig parse(String fileName, String text, Path baseDir, Function<String, String> environment)
            throws ConfigException {
        return parse(fileName, text, baseDir, environment, byre.notify.ChannelTypes.ALL);
    }

    /** The same with the given channel kinds. */
    public static ByreConfig parse(String fileName, String text, Path baseDir, Function<String, String> environment,
                                   List<? extends ChannelType<?>> channelTypes) throws ConfigException {
        return new ConfigLoader(fileName, baseDir, environment, channelTypes).read(text);
    }

    private ByreConfig read(String text) throws ConfigException {
        Node root;
        try {
            LoadSettings settings = LoadSettings.builder().setLabel(fileName).setMaxAliasesForCollections(10).build();
            root = new Compose(settings).composeString(text).orElse(null);
        } catch (MarkedYamlEngineException e) {
            int line = e.getProblemMark().map(m -> m.getLine() + 1).orElse(0);
            throw new ConfigException(List.of(new ConfigProblem(fileName, line, "not valid YAML: " + e.getProblem())));
        } catch (YamlEngineException e) {
            throw new ConfigException(List.of(new ConfigProblem(fileName, 0, "not valid YAML: " + e.getMessage())));
        }
        if (!(root instanceof MappingNode top)) {
            throw new ConfigException(List.of(new ConfigProblem(fileName, root == null ? 0 : NodeReader.line(root),
                    "the configuration must be a mapping of keys such as site:, mqtt:, sensors:, zones:")));
        }
        Map<String, Node> keys = r.mapping(top, TOP_KEYS, "top level");

        String site = r.string(keys.get("site"), "site", null);
        if (site == null) {
            r.problem(top, "missing 'site:' (a short id used in topics and messages, e.g. site: larkmoor)");
            site = "site";
        } else if (!site.matches("[A-Za-z0-9][A-Za-z0-9_.-]*")) {
            r.problem(keys.get("site"), "site '" + site + "' must be letters, digits, '-', '_' or '.' (it becomes an MQTT topic level)");
        }
        ZoneId tz = timezone(keys.get("timezone"));
        ByreConfig.DisplayUnits units = ByreConfig.DisplayUnits.METRIC;
        String u = r.string(keys.get("units"), "units", "metric");
        if ("us".equals(u)) {
            units = ByreConfig.DisplayUnits.US;
        } else if (!"metric".equals(u)) {
            r.problem(keys.get("units"), "units must be 'metric' or 'us', not '" + u + "'");
        }
        MqttSettings mqtt = mqtt(keys.get("mqtt"), site);
        Map<String, SensorConfig> sensors = sensors(keys.get("sensors"));
        Map<String, ZoneConfig> zones = zones(keys.get("zones"), sensors);
        Map<String, ChannelConfig> channels = channels(keys.get("notify"));
        List<Path> rules = rules(keys.get("rules"));
        HistorySettings history = history(keys.get("history"));
        AdminSettings admin = admin(keys.get("admin"));
        AlertSettings alerts = alerts(keys.get("digest"), keys.get("self-alerts"), channels);
        PageSettings page = page(keys.get("page"));
        CentralSettings central = central(keys.get("central"), site, mqtt, sensors, zones);

        if (!r.problems().isEmpty()) throw new ConfigException(r.problems());
        return new ByreConfig(Path.of(fileName), site, tz, units, mqtt, sensors, zones, channels, rules, history, admin, alerts, page,
                central);
    }

    // ---- sections ----

    private ZoneId timezone(Node node) {
        String text = r.string(node, "timezone", null);
        if (text == null) return ZoneId.systemDefault();
        try {
            return ZoneId.of(text);
        } catch (DateTimeException e) {
            r.problem(node, "unknown time zone '" + text + "'" + Suggest.hint(text, ZoneId.getAvailableZoneIds())
                    + "; use a region name such as Europe/London");
            return ZoneId.systemDefault();
        }
    }

    private MqttSettings mqtt(Node node, String site) {
        Map<String, Node> m = node == null ? Map.of() : r.mapping(node, MQTT_KEYS, "mqtt");
        String broker = r.string(m.get("broker"), "mqtt.broker", "embedded");
        if (!broker.equals("embedded") && !broker.matches("(tcp|ssl)://[^\\s/:]+(:\\d+)?")) {
            r.problem(m.get("broker"), "mqtt.broker must be 'embedded', tcp://host:port or ssl://host:port, not '" + broker + "'");
        }
        String listen = r.string(m.get("listen"), "mqtt.listen", "127.0.0.1:1883");
        NodeReader.HostPort hp = r.hostPort(m.get("listen"), "mqtt.listen", listen);
        if (broker.equals("embedded") && !byre.mqtt.EmbeddedBroker.isLoopback(hp.host())) {
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

    private Map<String, SensorConfig> sensors(Node node) {
        Map<String, SensorConfig> out = new LinkedHashMap<>();
        if (node == null) return out;
        Map<String, Node> entries = r.mapping(node, null, "sensors");
        Map<String, String> topicOwner = new HashMap<>();
        for (Map.Entry<String, Node> e : entries.entrySet()) {
            String id = e.getKey();
            Node n = e.getValue();
            if (!id.matches("[A-Za-z0-9][A-Za-z0-9_.-]*")) {
                r.problem(n, "sensor id '" + id + "' must be letters, digits, '-', '_' or '.'");
            }
            Map<String, Node> f = r.mapping(n, SENSOR_KEYS, "sensor " + id);
            String topic = r.string(f.get("topic"), "topic", null);
            if (topic == null) {
                r.problem(n, "sensor " + id + " has no topic");
                continue;
            }
            String clash = topicOwner.putIfAbsent(topic, id);
            if (clash != null) r.problem(f.get("topic"), "duplicate topic '" + topic + "': already used by sensor " + clash);
            String qText = r.string(f.get("quantity"), "quantity", null);
            Quantity q = null;
            if (qText == null) {
                r.problem(n, "sensor " + id + " has no quantity (one of " + String.join(", ", measurableIds()) + ")");
            } else {
                q = Quantity.byId(qText).filter(Quantity::measurable).orElse(null);
                if (q == null) {
                    r.problem(f.get("quantity"), "unknown quantity '" + qText + "'" + Suggest.hint(qText, measurableIds())
                            + "; a sensor measures one of " + String.join(", ", measurableIds()));
                }
            }
            Unit unit = q == null ? null : q.canonicalUnit();
            String uText = r.string(f.get("unit"), "unit", null);
            if (uText != null) {
                Optional<Unit> parsed = Unit.bySymbol(uText);
                if (parsed.isEmpty()) {
                    r.problem(f.get("unit"), "unknown unit '" + uText + "'" + Suggest.hint(uText, Unit.symbols())
                            + "; known units: " + String.join(" ", Unit.symbols()));
                } else if (q != null && parsed.get().dimension() != q.dimension()) {
                    r.problem(f.get("unit"), "unit '" + uText + "' does not measure " + q.id() + " (use one of "
                            + String.join(" ", unitsOf(q.dimension())) + ")");
                } else {
                    unit = parsed.get();
                }
            }
            PayloadFormat payload = payload(f.get("payload"));
            String time = r.string(f.get("time"), "time", null);
            String timePath = null;
            if (time != null) {
                if (time.startsWith("json:") && time.length() > 5 && payload.kind() == PayloadFormat.Kind.JSON) {
                    timePath = time.substring(5);
                } else {
                    r.problem(f.get("time"), "time must be json:<path> and needs a json: payload (SenML carries its own time)");
                }
            }
            int idLevel = r.integer(f.get("id-level"), "id-level", 0);
            boolean family = topic.contains("+") || topic.contains("#");
            if (!validTopicFilter(topic)) {
                r.problem(f.get("topic"), "topic '" + topic + "' is not a valid MQTT topic filter ('+' and '#' must fill a whole level, '#' only last)");
            } else if (family && idLevel <= 0) {
                r.problem(f.get("topic"), "topic '" + topic + "' has wildcards: add id-level: N (the topic level, from 1, that names each sensor)");
            } else if (idLevel > 0 && idLevel > topic.split("/", -1).length && !topic.endsWith("#")) {
                r.problem(f.get("id-level"), "id-level " + idLevel + " is beyond the " + topic.split("/", -1).length + " levels of '" + topic + "'");
            }
            int maxIds = r.integer(f.get("max-ids"), "max-ids", SensorConfig.DEFAULT_MAX_IDS);
            if (f.get("max-ids") != null && !family) {
                r.problem(f.get("max-ids"), "max-ids applies only to a topic with wildcards (a family of sensors)");
            } else if (maxIds < 1 || maxIds > SensorConfig.MAX_IDS_LIMIT) {
                r.problem(f.get("max-ids"), "max-ids must be 1.." + SensorConfig.MAX_IDS_LIMIT + ", not " + maxIds);
            }
            if (q != null && unit != null) {
                out.put(id, new SensorConfig(id, topic, q, unit, payload, timePath, idLevel, NodeReader.line(n), maxIds));
            }
        }
        return out;
    }

    private PayloadFormat payload(Node node) {
        String text = r.string(node, "payload", "number");
        if (text.equals("number")) return PayloadFormat.NUMBER;
        if (text.startsWith("json:") && text.length() > 5) return new PayloadFormat(PayloadFormat.Kind.JSON, text.substring(5));
        if (text.startsWith("senml:") && text.length() > 6) return new PayloadFormat(PayloadFormat.Kind.SENML, text.substring(6));
        r.problem(node, "payload must be number, json:<dotted.path> or senml:<name>, not '" + text + "'");
        return PayloadFormat.NUMBER;
    }

    private Map<String, ZoneConfig> zones(Node node, Map<String, SensorConfig> sensors) {
        Map<String, ZoneConfig> out = new LinkedHashMap<>();
        if (node == null) return out;
        Map<String, String> sensorOwner = new HashMap<>();
        for (Map.Entry<String, Node> e : r.mapping(node, null, "zones").entrySet()) {
            String id = e.getKey();
            Node n = e.getValue();
            if (!id.matches("[A-Za-z0-9][A-Za-z0-9_.-]*")) r.problem(n, "zone id '" + id + "' must be letters, digits, '-', '_' or '.'");
            Map<String, Node> f = r.mapping(n, ZONE_KEYS, "zone " + id);
            List<String> groups = r.stringList(f.get("groups"), "groups");
            List<String> zs = r.stringList(f.get("sensors"), "sensors");
            if (zs.isEmpty()) r.problem(n, "zone " + id + " lists no sensors");
            for (String s : zs) {
                if (!sensors.containsKey(s) && !isFamilyMember(s, sensors)) {
                    r.problem(f.get("sensors"), "zone " + id + " names unknown sensor '" + s + "'" + Suggest.hint(s, sensors.keySet()));
                }
                String other = sensorOwner.putIfAbsent(s, id);
                if (other != null) r.problem(f.get("sensors"), "sensor " + s + " is already in zone " + other + "; a sensor belongs to one zone");
            }
            double elevationM = Double.NaN;
            Node el = f.get("elevation");
            if (el != null) {
                String t = r.string(el, "elevation", "");
                java.util.regex.Matcher m = java.util.regex.Pattern.compile("\\s*(-?\\d+(?:\\.\\d+)?)\\s*(m|ft)?\\s*").matcher(t);
                if (m.matches()) {
                    elevationM = Double.parseDouble(m.group(1)) * ("ft".equals(m.group(2)) ? 0.3048 : 1.0);
                    if (elevationM < -500 || elevationM > 6000) r.problem(el, "elevation " + t + " is outside -500..6000 m");
                } else {
                    r.problem(el, "elevation must be a height such as '240 m' or '790 ft', not '" + t + "'");
                }
            }
            String ps = r.string(f.get("psychrometer"), "psychrometer", "aspirated");
            ZoneConfig.Psychrometer psychrometer = ZoneConfig.Psychrometer.ASPIRATED;
            if (ps.equals("screen")) {
                psychrometer = ZoneConfig.Psychrometer.SCREEN;
            } else if (!ps.equals("aspirated")) {
                r.problem(f.get("psychrometer"), "psychrometer must be 'aspirated' or 'screen', not '" + ps + "'" + Suggest.hint(ps, List.of("aspirated", "screen")));
            }
            // Without max-age the zone's max-age follows how often its sensors report (byre.daemon.Freshness).
            Duration maxAge = r.duration(f.get("max-age"), "max-age", ZoneConfig.UNLEARNT_MAX_AGE);
            String thi = r.string(f.get("thi"), "thi", "nrc-1971");
            if (!THI_VARIANTS.contains(thi)) {
                r.problem(f.get("thi"), "unknown THI variant '" + thi + "'" + Suggest.hint(thi, THI_VARIANTS) + "; one of " + String.join(", ", THI_VARIANTS));
            }
            out.put(id, new ZoneConfig(id, groups, zs, elevationM, psychrometer, maxAge, thi, NodeReader.line(n), f.get("max-age") == null));
        }
        return out;
    }

    /**
     * {@code central: { sites: { larkmoor: { zones: [cow-shed], groups: [dairy] } } }}: each listed zone becomes the zone
     * {@code <site>/<zone>}, fed by one sensor per quantity on the site's zone-stream topics; each site also gets the zone
     * {@code <site>} (group {@code sites}) whose {@code online} stream comes from its status and bridge topics. Added to
     * {@code sensors} and {@code zones}, so the rules, the history and {@code byre status} see them like any other.
     */
    private CentralSettings central(Node node, String ownSite, MqttSettings mqtt, Map<String, SensorConfig> sensors,
                                    Map<String, ZoneConfig> zones) {
        if (node == null) return CentralSettings.NONE;
        Map<String, Node> c = r.mapping(node, CENTRAL_KEYS, "central");
        if (c.get("sites") == null) {
            r.problem(node, "central: lists no sites (sites: { larkmoor: { zones: [cow-shed] } })");
            return CentralSettings.NONE;
        }
        Map<String, CentralSettings.Site> sites = new LinkedHashMap<>();
        for (Map.Entry<String, Node> e : r.mapping(c.get("sites"), null, "central.sites").entrySet()) {
            String id = e.getKey();
            Node n = e.getValue();
            if (!id.matches("[A-Za-z0-9][A-Za-z0-9_.-]*")) {
                r.problem(n, "site id '" + id + "' must be letters, digits, '-', '_' or '.' (it is a topic level of that site)");
                continue;
            }
            if (id.equals(ownSite)) r.problem(n, "site '" + id + "' is this byre's own site: the centre needs a site id of its own");
            if (zones.containsKey(id)) r.problem(n, "site '" + id + "' has the name of a zone of this configuration");
            Map<String, Node> f = r.mapping(n, SITE_KEYS, "site " + id);
            List<String> siteZones = r.stringList(f.get("zones"), "zones");
            if (siteZones.isEmpty()) r.problem(n, "site " + id + " lists no zones (zones: [cow-shed, calf-pen-1])");
            List<String> groups = r.stringList(f.get("groups"), "groups");
            if (groups.contains(CentralSettings.SITES_GROUP)) {
                r.problem(f.get("groups"), "group '" + CentralSettings.SITES_GROUP + "' is every site's own zone (its online stream); choose another name");
            }
            Duration maxAge = r.duration(f.get("max-age"), "max-age", Duration.ofMinutes(5));
            for (String z : siteZones) {
                if (!z.matches("[A-Za-z0-9][A-Za-z0-9_.-]*")) {
                    r.problem(f.get("zones"), "zone id '" + z + "' must be letters, digits, '-', '_' or '.'");
                    continue;
                }
                String zoneId = CentralSettings.zoneId(id, z);
                if (zones.containsKey(zoneId)) {
                    r.problem(f.get("zones"), "site " + id + " lists zone " + z + " twice");
                    continue;
                }
                List<String> zoneSensors = new ArrayList<>();
                for (Quantity q : Quantity.values()) {
                    if (q == Quantity.ONLINE) continue;
                    String sensorId = zoneId + "/" + q.id();
                    String topic = mqtt.publishPrefix() + "/" + id + "/zones/" + z + "/" + q.id();
                    sensors.put(sensorId, new SensorConfig(sensorId, topic, q, q.canonicalUnit(),
                            new PayloadFormat(PayloadFormat.Kind.JSON, "value"), "at", 0, NodeReader.line(n)));
                    zoneSensors.add(sensorId);
                }
                zones.put(zoneId, new ZoneConfig(zoneId, groups, zoneSensors, Double.NaN, ZoneConfig.Psychrometer.ASPIRATED, maxAge,
                        "nrc-1971", NodeReader.line(n)));
            }
            String online = CentralSettings.onlineSensor(id);
            sensors.put(online, new SensorConfig(online, mqtt.publishPrefix() + "/" + id + "/status", Quantity.ONLINE,
                    Quantity.ONLINE.canonicalUnit(), PayloadFormat.NUMBER, null, 0, NodeReader.line(n)));
            zones.put(id, new ZoneConfig(id, List.of(CentralSettings.SITES_GROUP), List.of(online), Double.NaN,
                    ZoneConfig.Psychrometer.ASPIRATED, maxAge, "nrc-1971", NodeReader.line(n)));
            sites.put(id, new CentralSettings.Site(id, siteZones, groups, maxAge, NodeReader.line(n)));
        }
        return new CentralSettings(sites);
    }

    private static boolean isFamilyMember(String id, Map<String, SensorConfig> sensors) {
        int slash = id.indexOf('/');
        if (slash <= 0) return false;
        SensorConfig family = sensors.get(id.substring(0, slash));
        return family != null && family.isFamily();
    }

    private Map<String, ChannelConfig> channels(Node node) {
        Map<String, ChannelConfig> out = new LinkedHashMap<>();
        if (node == null) return out;
        for (Map.Entry<String, Node> e : r.mapping(node, null, "notify").entrySet()) {
            String name = e.getKey();
            Node n = e.getValue();
            if (name.contains("/")) {
                // names with '/' are the site's own event stream (<prefix>/<site>/events)
                r.problem(n, "channel name '" + name + "' may not contain '/'");
                continue;
            }
            if (!(n instanceof MappingNode mn)) {
                r.problem(n, "channel " + name + " must be a mapping such as { type: webhook, url: ... }");
                continue;
            }
            Map<String, Node> raw = r.mapping(mn, null, "channel " + name);
            String type = r.string(raw.get("type"), "type", null);
            List<String> ids = channelTypes.stream().map(ChannelType::id).toList();
            if (type == null) {
                r.problem(n, "channel " + name + " has no type (one of " + String.join(", ", ids.stream().sorted().toList()) + ")");
                continue;
            }
            ChannelType<?> kind = channelTypes.stream().filter(k -> k.id().equals(type)).findFirst().orElse(null);
            if (kind == null) {
                r.problem(raw.get("type"), "unknown channel type '" + type + "'" + Suggest.hint(type, ids) + "; one of " + String.join(", ", ids));
                continue;
            }
            Set<String> allowed = NodeReader.ordered("type");
            allowed.addAll(kind.keys());
            allowed.addAll(CHANNEL_COMMON_KEYS);
            Map<String, Node> known = new LinkedHashMap<>();
            for (Map.Entry<String, Node> f : raw.entrySet()) {
                if (allowed.contains(f.getKey())) {
                    known.put(f.getKey(), f.getValue());
                } else {
                    r.unknownKey(r.keyOf(f.getValue()), f.getKey(), type + " channel " + name, allowed);
                }
            }
            for (String req : kind.required()) {
                if (!raw.containsKey(req)) r.problem(n, type + " channel " + name + " is missing '" + req + "'");
            }
            int rate = r.integer(known.get("rate-limit"), name + ".rate-limit", ChannelConfig.DEFAULT_RATE_LIMIT);
            if (rate < 1) r.problem(known.get("rate-limit"), name + ".rate-limit must be at least 1 (messages per 10 minutes)");
            Duration giveUp = r.duration(known.get("give-up"), name + ".give-up", ChannelConfig.DEFAULT_GIVE_UP);
            Object settings = kind.read(new ChannelFields(r, name, n, known));
            out.put(name, new ChannelConfig(name, kind, settings, Math.max(1, rate), giveUp, NodeReader.line(n)));
        }
        return out;
    }

    private AlertSettings alerts(Node digest, Node self, Map<String, ChannelConfig> channels) {
        java.time.LocalTime at = null;
        List<String> digestNotify = List.of();
        if (digest != null) {
            Map<String, Node> d = r.mapping(digest, DIGEST_KEYS, "digest");
            String t = r.string(d.get("at"), "digest.at", null);
            if (t == null) {
                r.problem(digest, "digest needs 'at' (a time of day in the site time zone, e.g. at: \"07:00\")");
            } else {
                try {
                    at = java.time.LocalTime.parse(t.strip().length() == 4 ? "0" + t.strip() : t.strip());
                } catch (java.time.format.DateTimeParseException e) {
                    r.problem(d.get("at"), "digest.at must be a time of day HH:MM such as 07:00, not '" + t + "'");
                }
            }
            digestNotify = channelList(d.get("notify"), "digest.notify", channels);
            if (digestNotify.isEmpty() && !d.containsKey("notify")) r.problem(digest, "digest needs 'notify' (the channels that get it)");
        }
        List<String> selfNotify = List.of();
        Duration failingAfter = AlertSettings.DEFAULT_CHANNEL_FAILING_AFTER;
        if (self != null) {
            Map<String, Node> m = r.mapping(self, SELF_ALERT_KEYS, "self-alerts");
            selfNotify = channelList(m.get("notify"), "self-alerts.notify", channels);
            failingAfter = r.duration(m.get("channel-failing-after"), "self-alerts.channel-failing-after", failingAfter);
        } else {
            selfNotify = new ArrayList<>(channels.keySet()); // by default byre's own trouble goes everywhere
        }
        return new AlertSettings(at, digestNotify, selfNotify, failingAfter);
    }

    private List<String> channelList(Node node, String what, Map<String, ChannelConfig> channels) {
        List<String> out = r.stringList(node, what);
        for (String c : out) {
            if (!channels.containsKey(c)) r.problem(node, what + " names unknown channel '" + c + "'" + Suggest.hint(c, channels.keySet()));
        }
        return out;
    }

    private List<Path> rules(Node node) {
        List<Path> out = new ArrayList<>();
        if (node == null) return out;
        if (node instanceof SequenceNode) {
            for (String s : r.stringList(node, "rules")) out.add(r.resolve(s));
        } else {
            String s = r.string(node, "rules", null);
            if (s != null) out.add(r.resolve(s));
        }
        return out;
    }

    private HistorySettings history(Node node) {
        Map<String, Node> m = node == null ? Map.of() : r.mapping(node, HISTORY_KEYS, "history");
        Path path = r.resolve(r.string(m.get("path"), "history.path", "/var/lib/byre/history.db"));
        historyPath(m.get("path"), path);
        Duration raw = r.duration(m.get("keep-raw"), "history.keep-raw", Duration.ofDays(14));
        Duration minute = r.duration(m.get("keep-minute"), "history.keep-minute", Duration.ofDays(90));
        Duration hour = r.duration(m.get("keep-hour"), "history.keep-hour", Duration.ofDays(5 * 365 + 1));
        if (raw.compareTo(minute) > 0) r.problem(m.get("keep-raw"), "history.keep-raw must not be longer than keep-minute");
        if (minute.compareTo(hour) > 0) r.problem(m.get("keep-minute"), "history.keep-minute must not be longer than keep-hour");
        Duration commitEvery = r.duration(m.get("commit-every"), "history.commit-every", HistorySettings.DEFAULT_COMMIT_EVERY);
        if (commitEvery.compareTo(Duration.ofMinutes(1)) > 0) {
            r.problem(m.get("commit-every"), "history.commit-every must be at most 1m: readings not yet committed are held only by the broker,"
                + " whose in-flight window and queue must hold that many");
        }
        return new HistorySettings(path, raw, minute, hour, commitEvery);
    }

    /**
     * SQLite keeps its journal and write-ahead log beside the database ({@code history.db-wal}): the path must be
     * a regular file or not yet exist, in a folder that exists or can be made ({@code /dev/null} would make
     * SQLite create {@code /dev/null-journal}).
     */
    private void historyPath(Node node, Path path) {
        if (Files.isDirectory(path)) {
            r.problem(node, "history.path " + path + " is a folder; give a file in it, such as " + path.resolve("history.db"));
        } else if (Files.exists(path) && !Files.isRegularFile(path)) {
            r.problem(node, "history.path " + path + " is not a regular file (a device, FIFO or socket); give a database file such as /var/lib/byre/history.db");
        } else {
            for (Path dir = path.toAbsolutePath().getParent(); dir != null; dir = dir.getParent()) {
                if (!Files.exists(dir)) continue; // created at start
                if (!Files.isDirectory(dir)) r.problem(node, "history.path " + path + ": " + dir + " is not a folder");
                break;
            }
        }
    }

    private AdminSettings admin(Node node) {
        Map<String, Node> m = node == null ? Map.of() : r.mapping(node, ADMIN_KEYS, "admin");
        String listen = r.string(m.get("listen"), "admin.listen", "127.0.0.1:9466");
        NodeReader.HostPort hp = r.hostPort(m.get("listen"), "admin.listen", listen);
        String tokenFile = r.string(m.get("token-file"), "admin.token-file", null);
        Secret token = null;
        String tokenProblem = null;
        if (tokenFile != null) {
            Path p = r.resolve(tokenFile);
            try {
                String v = SmallFile.secret(p);
                if (v.isEmpty()) {
                    tokenProblem = "admin.token-file " + p + " is empty";
                } else {
                    token = new Secret(v, p.toString());
                }
            } catch (SmallFile.Refused e) {
                tokenProblem = "admin.token-file: " + e.getMessage();
            } catch (IOException e) {
                tokenProblem = "admin.token-file: cannot read " + p + " (" + SmallFile.describe(e) + ")";
            }
        }
        return new AdminSettings(hp.host(), hp.port(), token, tokenProblem);
    }

    private PageSettings page(Node node) {
        Map<String, Node> m = node == null ? Map.of() : r.mapping(node, PAGE_KEYS, "page");
        String listen = r.string(m.get("listen"), "page.listen", "127.0.0.1:0");
        NodeReader.HostPort hp = r.hostPort(m.get("listen"), "page.listen", listen);
        String baseUrl = r.string(m.get("base-url"), "page.base-url", null);
        if (baseUrl != null) {
            baseUrl = baseUrl.strip();
            while (baseUrl.endsWith("/")) baseUrl = baseUrl.substring(0, baseUrl.length() - 1);
            if (!baseUrl.matches("https?://[^\\s/?#]+(/[^\\s?#]*)?")) {
                r.problem(m.get("base-url"), "page.base-url must be the address a phone uses to reach the page, such as "
                        + "http://192.168.1.20:9467, not '" + baseUrl + "'");
                baseUrl = null;
            }
        }
        String keyFile = r.string(m.get("link-key-file"), "page.link-key-file", null);
        Duration valid = r.duration(m.get("link-valid"), "page.link-valid", PageSettings.DEFAULT_LINK_VALID);
        String reading = r.string(m.get("reading"), "page.reading", "open");
        if (!reading.equals("open") && !reading.equals("token")) {
            r.problem(m.get("reading"), "page.reading must be 'open' (no login on the listener's network) or 'token' "
                    + "(the admin token as password), not '" + reading + "'");
        }
        if (baseUrl != null && hp.port() == 0) {
            r.problem(m.get("base-url"), "page.base-url is set but page.listen is not: links would lead nowhere");
        }
        return new PageSettings(hp.host(), hp.port(), baseUrl, keyFile == null ? null : r.resolve(keyFile), valid,
                reading.equals("token"));
    }

    private static boolean validTopicFilter(String topic) {
        if (topic.isEmpty()) return false;
        String[] levels = topic.split("/", -1);
        for (int i = 0; i < levels.length; i++) {
            String l = levels[i];
            if (l.contains("#") && (!l.equals("#") || i != levels.length - 1)) return false;
            if (l.contains("+") && !l.equals("+")) return false;
        }
        return true;
    }

    private static List<String> measurableIds() {
        return java.util.Arrays.stream(Quantity.values()).filter(Quantity::measurable).map(Quantity::id).toList();
    }

    private static List<String> unitsOf(Dimension d) {
        return java.util.Arrays.stream(Unit.values()).filter(u -> u.dimension() == d).map(Unit::symbol).toList();
    }


}
