package byre.config;

import java.util.ArrayList;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Set;

/**
 * The access list of the barn's mosquitto (its {@code acl_file} format), written from byre's configuration, so the
 * broker lets each login do exactly its job:
 * <ul>
 * <li>{@code byre}: reads the sensor topics, reads and writes under {@code <prefix>/<site>/} (zone streams, status,
 *     alert state, events, the ack topic), writes the topics of its {@code mqtt} alert channels;</li>
 * <li>{@code operators}: writes the ack topic, and reads every topic: the farm's own people, who must see what a
 *     device really publishes when byre says it is silent (a wrong topic, see Troubleshooting in the README);</li>
 * <li>every other login (one per sensor gateway if wanted, {@code sensors} by default): writes the configured
 *     sensor topics and nothing else; reads nothing.</li>
 * </ul>
 * mosquitto denies what a list does not grant, also to logins it does not name.
 */
public final class BrokerAcl {
    public static final String BYRE = "byre";
    public static final String OPERATORS = "operators";
    public static final String SENSORS = "sensors";

    private BrokerAcl() {}

    /** The access list for these sensor logins (the {@code sensors} login is always included). */
    public static String render(ByreConfig c, List<String> sensorLogins) {
        String base = c.mqtt().publishPrefix() + "/" + c.site() + "/";
        Set<String> sensorTopics = new LinkedHashSet<>();
        for (SensorConfig s : c.sensors().values()) sensorTopics.add(checked(s.topic()));
        Set<String> channelTopics = new LinkedHashSet<>();
        for (ChannelConfig ch : c.channels().values()) {
            if (ch.settings() instanceof PublishesToBroker p && p.brokerTopic() != null && !p.brokerTopic().isEmpty()) {
                channelTopics.add(checked(p.brokerTopic()));
            }
        }
        StringBuilder sb = new StringBuilder();
        sb.append("# Access list of byre's logins on the barn broker, for site ").append(c.site()).append(", written by 'byre broker-acl'\n")
                .append("# from ").append(c.file()).append(". 'byre-broker acl' writes it again after a change of sensors; edits here are lost.\n");
        sb.append("\nuser ").append(BYRE).append('\n');
        for (String t : sensorTopics) sb.append("topic read ").append(t).append('\n');
        sb.append("topic readwrite ").append(base).append("#\n");
        for (String t : channelTopics) sb.append("topic write ").append(t).append('\n');
        sb.append("\nuser ").append(OPERATORS).append('\n');
        sb.append("topic write ").append(base).append("ack\n");
        sb.append("topic read #\n");
        Set<String> logins = new LinkedHashSet<>();
        logins.add(SENSORS);
        for (String l : sensorLogins) if (!l.equals(BYRE) && !l.equals(OPERATORS)) logins.add(checkedLogin(l));
        for (String login : logins) {
            sb.append("\nuser ").append(login).append('\n');
            for (String t : sensorTopics) sb.append("topic write ").append(t).append('\n');
        }
        return sb.toString();
    }

    /** The logins of a mosquitto password file ({@code name:hash} lines), in file order. */
    public static List<String> logins(List<String> passwordFileLines) {
        List<String> out = new ArrayList<>();
        for (String line : passwordFileLines) {
            int colon = line.indexOf(':');
            if (colon > 0 && !line.startsWith("#")) out.add(line.substring(0, colon));
        }
        return out;
    }

    /** A topic goes into the list as the rest of a line: one with a control character could add lines of its own. */
    private static String checked(String topic) {
        if (topic.isBlank() || topic.chars().anyMatch(ch -> ch < 0x20 || ch == 0x7f) || !topic.strip().equals(topic)) {
            throw new IllegalArgumentException("topic '" + topic.replaceAll("\\p{Cntrl}", "?") + "' cannot go into the broker's access list");
        }
        return topic;
    }

    private static String checkedLogin(String login) {
        if (!login.matches("[A-Za-z0-9][A-Za-z0-9_.-]{0,63}")) {
            throw new IllegalArgumentException("login '" + login.replaceAll("\\p{Cntrl}", "?") + "' must be letters, digits, '-', '_' or '.'");
        }
        return login;
    }
}
