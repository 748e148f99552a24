package byre.config;

import byre.units.Suggest;
import java.time.Duration;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import org.snakeyaml.engine.v2.nodes.MappingNode;
import org.snakeyaml.engine.v2.nodes.Node;

/**
 * Reads {@code notify:}: each channel's {@code type:} picks one of the given {@link ChannelType}s, which reads and
 * checks its own keys; the keys every channel has ({@link #COMMON_KEYS}) are read here.
 */
final class ChannelSection {
    /** Keys every channel has, whatever its kind. */
    static final Set<String> COMMON_KEYS = NodeReader.ordered("type", "rate-limit", "give-up");

    private ChannelSection() {}

    /** The channels by name, in the file's order. */
    static Map<String, ChannelConfig> read(NodeReader r, Node node, List<ChannelType<?>> channelTypes) {
        Map<String, ChannelConfig> out = new LinkedHashMap<>();
        if (node == null) return out;
        for (Map.Entry<String, Node> e : r.mapping(node, null, "notify").entrySet()) {
            String name = e.getKey();
            Node n = e.getValue();
            if (name.contains("/")) {
                // names with '/' are the site's own event stream (<prefix>/<site>/events)
                r.problem(r.keyOf(n), "channel name '" + name + "' may not contain '/'");
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
            allowed.addAll(COMMON_KEYS);
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
}
