package byre.config;

import byre.units.Suggest;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.time.DateTimeException;
import java.time.ZoneId;
import java.util.ArrayList;
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
 * collecting every problem as {@code file:line:col: message}. Each section has its own reader beside the settings
 * it makes ({@code MqttSection}, {@code SensorSection}, ...); this class parses the file, hands each section over
 * in turn and builds the {@link ByreConfig} when no problem was found. Secrets are read from the files or
 * environment variables the configuration names; their values never enter a message.
 */
public final class ConfigLoader {
    static final Set<String> TOP_KEYS = NodeReader.ordered("site", "timezone", "units", "mqtt", "sensors", "zones", "notify",
            "rules", "history", "admin", "digest", "self-alerts", "page", "central");

    private ConfigLoader() {}

    /** Loads and validates a configuration file; {@code channelTypes} are the kinds a channel's {@code type:} may name. */
    public static ByreConfig load(Path file, List<? extends ChannelType<?>> channelTypes) throws ConfigException {
        String text;
        try {
            text = new String(SmallFile.read(file, SmallFile.CONFIG_MAX_BYTES), StandardCharsets.UTF_8);
        } catch (SmallFile.Refused e) {
            throw new ConfigException(List.of(ConfigProblem.ofFile(file.toString(), "cannot read the configuration: " + e.getMessage())));
        } catch (IOException e) {
            throw new ConfigException(List.of(ConfigProblem.ofFile(file.toString(),
                    "cannot read the configuration: " + SmallFile.describe(e))));
        }
        Path dir = file.toAbsolutePath().getParent();
        return parse(file.toString(), text, dir, System::getenv, channelTypes);
    }

    /**
     * Validates configuration text; relative paths are resolved against {@code baseDir}, {@code environment} looks up
     * the variables the configuration names, and {@code channelTypes} are the kinds a channel's {@code type:} may name.
     */
    public static ByreConfig parse(String fileName, String text, Path baseDir, Function<String, String> environment,
                                   List<? extends ChannelType<?>> channelTypes) throws ConfigException {
        MappingNode top = compose(fileName, text);
        NodeReader r = new NodeReader(fileName, baseDir);
        Map<String, Node> keys = r.mapping(top, TOP_KEYS, "top level");

        String site = site(r, top, keys.get("site"));
        ZoneId tz = timezone(r, keys.get("timezone"));
        ByreConfig.DisplayUnits units = units(r, keys.get("units"));
        MqttSettings mqtt = MqttSection.read(r, keys.get("mqtt"), site, environment);
        Map<String, SensorConfig> sensors = SensorSection.read(r, keys.get("sensors"));
        Map<String, ZoneConfig> zones = ZoneSection.read(r, keys.get("zones"), sensors);
        Map<String, ChannelConfig> channels = ChannelSection.read(r, keys.get("notify"), List.copyOf(channelTypes));
        List<Path> rules = rules(r, keys.get("rules"));
        HistorySettings history = HistorySection.read(r, keys.get("history"));
        AdminSettings admin = AdminSection.read(r, keys.get("admin"));
        AlertSettings alerts = AlertSection.read(r, keys.get("digest"), keys.get("self-alerts"), channels);
        PageSettings page = PageSection.read(r, keys.get("page"));
        CentralSettings central = CentralSection.read(r, keys.get("central"), site, mqtt, sensors, zones);

        if (!r.problems().isEmpty()) throw new ConfigException(r.problems());
        return new ByreConfig(Path.of(fileName), site, tz, units, mqtt, sensors, zones, channels, rules, history, admin, alerts, page,
                central);
    }

    /** The document's top mapping; text that is not YAML, or not a mapping, stops here with one problem. */
    private static MappingNode compose(String fileName, String text) throws ConfigException {
        Node root;
        try {
            LoadSettings settings = LoadSettings.builder().setLabel(fileName).setMaxAliasesForCollections(10).build();
            root = new Compose(settings).composeString(text).orElse(null);
        } catch (MarkedYamlEngineException e) {
            throw new ConfigException(List.of(ConfigProblem.at(fileName, e.getProblemMark(), "not valid YAML: " + e.getProblem())));
        } catch (YamlEngineException e) {
            throw new ConfigException(List.of(ConfigProblem.ofFile(fileName, "not valid YAML: " + e.getMessage())));
        }
        if (!(root instanceof MappingNode top)) {
            throw new ConfigException(List.of(ConfigProblem.at(fileName, root == null ? Optional.empty() : root.getStartMark(),
                    "the configuration must be a mapping of keys such as site:, mqtt:, sensors:, zones:")));
        }
        return top;
    }

    private static String site(NodeReader r, MappingNode top, Node node) {
        String site = r.string(node, "site", null);
        if (site == null) {
            r.problem(top, "missing 'site:' (a short id used in topics and messages, e.g. site: larkmoor)");
            return "site";
        }
        if (!site.matches("[A-Za-z0-9][A-Za-z0-9_.-]*")) {
            r.problem(node, "site '" + site + "' must be letters, digits, '-', '_' or '.' (it becomes an MQTT topic level)");
        }
        return site;
    }

    private static ZoneId timezone(NodeReader r, Node node) {
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

    private static ByreConfig.DisplayUnits units(NodeReader r, Node node) {
        String u = r.string(node, "units", "metric");
        if ("us".equals(u)) return ByreConfig.DisplayUnits.US;
        if (!"metric".equals(u)) r.problem(node, "units must be 'metric' or 'us', not '" + u + "'");
        return ByreConfig.DisplayUnits.METRIC;
    }

    /** {@code rules:} one file or folder, or a list of them, relative to the configuration's folder. */
    private static List<Path> rules(NodeReader r, Node node) {
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
}
