package byre.config;

import byre.units.Suggest;
import java.io.IOException;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Collection;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.Set;
import org.snakeyaml.engine.v2.nodes.MappingNode;
import org.snakeyaml.engine.v2.nodes.Node;
import org.snakeyaml.engine.v2.nodes.NodeTuple;
import org.snakeyaml.engine.v2.nodes.ScalarNode;
import org.snakeyaml.engine.v2.nodes.SequenceNode;

/**
 * Typed values from the nodes of one configuration file. A value of the wrong type or form becomes a
 * {@link ConfigProblem} at its line and column, and the reader goes on with a fallback, so one run finds every problem.
 */
final class NodeReader {
    private final String fileName;
    private final Path baseDir;
    private final List<ConfigProblem> problems = new ArrayList<>();
    /** Each value read through {@link #mapping} to its key, for messages about the key itself. */
    private final Map<Node, Node> keyNodes = new HashMap<>();

    /** {@code baseDir}: the configuration's folder, against which relative paths are resolved (null: as written). */
    NodeReader(String fileName, Path baseDir) {
        this.fileName = fileName;
        this.baseDir = baseDir;
    }

    /** Every problem recorded so far, in the order found. */
    List<ConfigProblem> problems() {
        return problems;
    }

    /** Reads a mapping; unknown keys (when {@code known} is given) and duplicate keys are problems. */
    Map<String, Node> mapping(Node node, Set<String> known, String where) {
        Map<String, Node> out = new LinkedHashMap<>();
        if (!(node instanceof MappingNode mn)) {
            if (node != null && !(node instanceof ScalarNode s && s.getValue().isEmpty())) {
                problem(node, where + " must be a mapping of keys, not " + kind(node));
            }
            return out;
        }
        for (NodeTuple t : mn.getValue()) {
            if (!(t.getKeyNode() instanceof ScalarNode k)) {
                problem(t.getKeyNode(), "keys in " + where + " must be plain words");
                continue;
            }
            String key = k.getValue();
            if (known != null && !known.contains(key)) {
                unknownKey(k, key, where, known);
                continue;
            }
            if (out.containsKey(key)) {
                problem(k, "duplicate key '" + key + "' in " + where);
                continue;
            }
            keyNodes.put(t.getValueNode(), k);
            out.put(key, t.getValueNode());
        }
        return out;
    }

    /** Records {@code key} as unknown in {@code where}, with the nearest of {@code known} as a suggestion. */
    void unknownKey(Node at, String key, String where, Collection<String> known) {
        problem(at, "unknown key '" + key + "' in " + where + Suggest.hint(key, known));
    }

    /** The key that holds {@code value} in a mapping read by {@link #mapping}, or the value itself. */
    Node keyOf(Node value) {
        return keyNodes.getOrDefault(value, value);
    }

    String string(Node node, String what, String fallback) {
        if (node == null) return fallback;
        if (node instanceof ScalarNode s) {
            return s.getValue().isEmpty() && fallback != null ? fallback : s.getValue();
        }
        problem(node, what + " must be a single value, not " + kind(node));
        return fallback;
    }

    int integer(Node node, String what, int fallback) {
        String s = string(node, what, null);
        if (s == null) return fallback;
        try {
            return Integer.parseInt(s.trim());
        } catch (NumberFormatException e) {
            problem(node, what + " must be a whole number, not '" + s + "'");
            return fallback;
        }
    }

    boolean bool(Node node, String what, boolean fallback) {
        String s = string(node, what, null);
        if (s == null) return fallback;
        return switch (s.strip().toLowerCase(java.util.Locale.ROOT)) {
            case "true", "yes", "on" -> true;
            case "false", "no", "off" -> false;
            default -> {
                problem(node, what + " must be true or false, not '" + s + "'");
                yield fallback;
            }
        };
    }

    Duration duration(Node node, String what, Duration fallback) {
        String s = string(node, what, null);
        if (s == null) return fallback;
        Optional<Duration> d = Durations.parse(s);
        if (d.isEmpty() || d.get().isZero()) {
            problem(node, what + " must be a duration such as 30s, 20m, 2h, 14d or 5y, not '" + s + "'");
            return fallback;
        }
        return d.get();
    }

    /** A list of single values, or one value as a list of one. */
    List<String> stringList(Node node, String what) {
        List<String> out = new ArrayList<>();
        for (Item item : items(node, what)) out.add(item.value());
        return out;
    }

    /** The same with each value's node, for a message about one value of the list. */
    List<Item> items(Node node, String what) {
        List<Item> out = new ArrayList<>();
        if (node == null) return out;
        if (node instanceof ScalarNode s) {
            if (!s.getValue().isEmpty()) out.add(new Item(s.getValue(), s));
            return out;
        }
        if (!(node instanceof SequenceNode seq)) {
            problem(node, what + " must be a list such as [a, b]");
            return out;
        }
        for (Node item : seq.getValue()) {
            String v = string(item, what + " item", null);
            if (v != null) out.add(new Item(v, item));
        }
        return out;
    }

    /** One value of a list and where it is written. */
    record Item(String value, Node node) {}

    /** The secret in the file the node names; null (with a problem) when it is empty or cannot be read. */
    Secret secretFile(Node node, String what) {
        String s = string(node, what, null);
        if (s == null) return null;
        Path p = resolve(s);
        try {
            String v = SmallFile.secret(p);
            if (v.isEmpty()) {
                problem(node, what + ": " + p + " is empty");
                return null;
            }
            return new Secret(v, p.toString());
        } catch (SmallFile.Refused e) {
            problem(node, what + ": " + e.getMessage());
            return null;
        } catch (IOException e) {
            problem(node, what + ": cannot read " + p + " (" + SmallFile.describe(e) + ")");
            return null;
        }
    }

    /** A listening address; a wrong one is a problem and gives 127.0.0.1:0 (off). */
    HostPort hostPort(Node node, String what, String text) {
        int colon = text.lastIndexOf(':');
        if (colon > 0) {
            try {
                int port = Integer.parseInt(text.substring(colon + 1));
                if (port >= 0 && port <= 65535) return new HostPort(text.substring(0, colon), port);
            } catch (NumberFormatException ignored) {
                // reported below
            }
        }
        problem(node, what + " must be host:port such as 127.0.0.1:1883, not '" + text + "'");
        return new HostPort("127.0.0.1", 0);
    }

    record HostPort(String host, int port) {}

    /** A path as written, relative to the configuration's folder. */
    Path resolve(String s) {
        Path p = Path.of(s);
        return p.isAbsolute() || baseDir == null ? p : baseDir.resolve(p).normalize();
    }

    /** Records a problem where the node starts (at the file when there is no node). */
    void problem(Node node, String message) {
        problems.add(ConfigProblem.at(fileName, node == null ? Optional.empty() : node.getStartMark(), message));
    }

    /** The node's line, from 1. */
    static int line(Node node) {
        return node.getStartMark().map(m -> m.getLine() + 1).orElse(0);
    }

    private static String kind(Node node) {
        if (node instanceof MappingNode) return "a mapping";
        if (node instanceof SequenceNode) return "a list";
        return "a single value";
    }

    /** A section's keys in the order messages list them. */
    static Set<String> ordered(String... keys) {
        return new LinkedHashSet<>(List.of(keys));
    }
}
