package byre.config;

import byre.units.Suggest;
import java.time.Duration;
import java.time.LocalTime;
import java.time.format.DateTimeParseException;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Set;
import org.snakeyaml.engine.v2.nodes.Node;

/** Reads and checks {@code digest:} and {@code self-alerts:}, whose channels must be among those of {@code notify:}. */
final class AlertSection {
    static final Set<String> DIGEST_KEYS = NodeReader.ordered("at", "notify");
    static final Set<String> SELF_ALERT_KEYS = NodeReader.ordered("notify", "channel-failing-after");

    private AlertSection() {}

    static AlertSettings read(NodeReader r, Node digest, Node self, Map<String, ChannelConfig> channels) {
        LocalTime at = null;
        List<String> digestNotify = List.of();
        if (digest != null) {
            Map<String, Node> d = r.mapping(digest, DIGEST_KEYS, "digest");
            String t = r.string(d.get("at"), "digest.at", null);
            if (t == null) {
                r.problem(digest, "digest needs 'at' (a time of day in the site time zone, e.g. at: \"07:00\")");
            } else {
                try {
                    at = LocalTime.parse(t.strip().length() == 4 ? "0" + t.strip() : t.strip());
                } catch (DateTimeParseException e) {
                    r.problem(d.get("at"), "digest.at must be a time of day HH:MM such as 07:00, not '" + t + "'");
                }
            }
            digestNotify = channelList(r, d.get("notify"), "digest.notify", channels);
            if (digestNotify.isEmpty() && !d.containsKey("notify")) r.problem(digest, "digest needs 'notify' (the channels that get it)");
        }
        List<String> selfNotify;
        Duration failingAfter = AlertSettings.DEFAULT_CHANNEL_FAILING_AFTER;
        if (self != null) {
            Map<String, Node> m = r.mapping(self, SELF_ALERT_KEYS, "self-alerts");
            selfNotify = channelList(r, m.get("notify"), "self-alerts.notify", channels);
            failingAfter = r.duration(m.get("channel-failing-after"), "self-alerts.channel-failing-after", failingAfter);
        } else {
            selfNotify = new ArrayList<>(channels.keySet()); // by default byre's own trouble goes everywhere
        }
        return new AlertSettings(at, digestNotify, selfNotify, failingAfter);
    }

    private static List<String> channelList(NodeReader r, Node node, String what, Map<String, ChannelConfig> channels) {
        List<String> out = new ArrayList<>();
        for (NodeReader.Item c : r.items(node, what)) {
            if (!channels.containsKey(c.value())) {
                r.problem(c.node(), what + " names unknown channel '" + c.value() + "'" + Suggest.hint(c.value(), channels.keySet()));
            }
            out.add(c.value());
        }
        return out;
    }
}
