package byre.mqtt;

/**
 * MQTT 3.1.1 topic filter matching (section 4.7), on topics and filters split into levels once: a message is
 * matched against many filters, and splitting each again per message would cost more than the match.
 */
public final class TopicFilter {
    private TopicFilter() {
    }

    /** The levels of a topic or filter; empty levels are kept ("a//b" has three, "/a" two). */
    public static String[] levels(String topicOrFilter) {
        return topicOrFilter.split("/", -1);
    }

    /**
     * True when the topic's levels match the filter's: {@code +} stands for one level, a last {@code #} for any rest.
     * A filter that starts with a wildcard does not match a topic starting with {@code $} (section 4.7.2): such
     * topics, {@code $SYS/...} above all, are the broker's own, and only a filter that names them takes them.
     */
    public static boolean matches(String[] filter, String[] topic) {
        if ((filter[0].equals("#") || filter[0].equals("+")) && topic[0].startsWith("$")) return false;
        for (int i = 0; i < filter.length; i++) {
            if (filter[i].equals("#")) return true;
            if (i >= topic.length) return false;
            if (!filter[i].equals("+") && !filter[i].equals(topic[i])) return false;
        }
        return filter.length == topic.length;
    }
}
