package byre.config;

import java.nio.file.Path;
import java.time.Duration;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.snakeyaml.engine.v2.nodes.MappingNode;
import org.snakeyaml.engine.v2.nodes.Node;
import org.snakeyaml.engine.v2.nodes.NodeTuple;
import org.snakeyaml.engine.v2.nodes.ScalarNode;
import org.snakeyaml.engine.v2.nodes.SequenceNode;

/**
 * The keys of one channel as written, for its {@link ChannelType} to read. Every reader names the value
 * {@code <channel>.<key>} in its messages and records a problem at the value's line and column instead of throwing.
 */
public final class ChannelFields {
    private final NodeReader reader;
    private final String channel;
    private final Node node;
    private final Map<String, Node> raw;

    ChannelFields(NodeReader reader, String channel, Node node, Map<String, Node> raw) {
        this.reader = reader;
        this.channel = channel;
        this.node = node;
        this.raw = raw;
    }

    /** The channel's name. */
    public String channel() {
        return channel;
    }

    public boolean has(String key) {
        return raw.containsKey(key);
    }

    public String string(String key, String fallback) {
        return reader.string(raw.get(key), what(key), fallback);
    }

    public int integer(String key, int fallback) {
        return reader.integer(raw.get(key), what(key), fallback);
    }

    public boolean bool(String key, boolean fallback) {
        return reader.bool(raw.get(key), what(key), fallback);
    }

    /** A duration such as 10s; a wrong one is a problem and gives {@code fallback}. */
    public Duration duration(String key, Duration fallback) {
        return reader.duration(raw.get(key), what(key), fallback);
    }

    /** A list of words, or one word as a list of one. */
    public List<String> list(String key) {
        return reader.stringList(raw.get(key), what(key));
    }

    /** Whether the key holds a list (not a single value or a mapping). */
    public boolean isList(String key) {
        return raw.get(key) instanceof SequenceNode;
    }

    /** Whether the key holds a mapping. */
    public boolean isMapping(String key) {
        return raw.get(key) instanceof MappingNode;
    }

    /** A mapping of single values, in the file's order; empty when absent or not a mapping. */
    public Map<String, String> map(String key) {
        Map<String, String> out = new LinkedHashMap<>();
        if (!(raw.get(key) instanceof MappingNode m)) return out;
        for (NodeTuple t : m.getValue()) {
            String k = t.getKeyNode() instanceof ScalarNode s ? s.getValue() : "?";
            String v = reader.string(t.getValueNode(), what(key) + "." + k, null);
            if (v != null) out.put(k, v);
        }
        return out;
    }

    /** The secret in the file the key names (relative to the configuration's folder); null when absent or unreadable. */
    public Secret secretFile(String key) {
        return reader.secretFile(raw.get(key), what(key));
    }

    /** A path relative to the configuration's folder. */
    public Path path(String key) {
        String s = string(key, null);
        return s == null ? null : reader.resolve(s);
    }

    /** Records a problem at the key's value (or at the channel when the key is absent). */
    public void problem(String key, String message) {
        Node at = raw.get(key);
        reader.problem(at == null ? node : at, message);
    }

    private String what(String key) {
        return channel + "." + key;
    }
}
