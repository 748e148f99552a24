package byre.notify;

import byre.config.ChannelConfig;
import byre.config.Durations;
import byre.config.Secret;
import byre.mqtt.MqttLink;
import java.net.URI;
import java.net.URISyntaxException;
import java.time.Duration;
import java.time.ZoneId;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/** Builds a {@link Channel} and its delivery policy from a configured channel. */
public final class ChannelFactory {
    public static final int DEFAULT_RATE_LIMIT = 10;
    public static final Duration DEFAULT_GIVE_UP = Duration.ofHours(24);
    static final Duration DEFAULT_TIMEOUT = Duration.ofSeconds(10);

    private final MqttLink link;
    private final ZoneId zone;

    /** {@code link} may be null (no mqtt channels then); {@code zone} is the site time zone for message text. */
    public ChannelFactory(MqttLink link, ZoneId zone) {
        this.link = link;
        this.zone = zone;
    }

    /** Rate limit and give-up age of one channel. */
    public record Policy(int perTenMinutes, Duration giveUp) {
        public static Policy defaults() {
            return new Policy(DEFAULT_RATE_LIMIT, DEFAULT_GIVE_UP);
        }
    }

    public static Policy policy(ChannelConfig c) {
        int rate = DEFAULT_RATE_LIMIT;
        Object r = c.fields().get("rate-limit");
        if (r != null) {
            try {
                rate = Math.max(1, Integer.parseInt(r.toString().strip()));
            } catch (NumberFormatException ignored) {
                // the configuration loader reports it
            }
        }
        return new Policy(rate, duration(c, "give-up", DEFAULT_GIVE_UP));
    }

    /** The channel, or an {@link IllegalArgumentException} whose message says what is wrong with it. */
    public Channel build(ChannelConfig c) {
        Duration timeout = duration(c, "timeout", DEFAULT_TIMEOUT);
        switch (c.type()) {
            case "webhook": {
                URI url;
                try {
                    url = new URI(c.string("url", ""));
                } catch (URISyntaxException e) {
                    throw new IllegalArgumentException("channel " + c.name() + ": url is not a valid URL: " + e.getMessage());
                }
                if (!"http".equals(url.getScheme()) && !"https".equals(url.getScheme()) || url.getHost() == null) {
                    throw new IllegalArgumentException("channel " + c.name() + ": url must be http(s)://host/..., not '" + url + "'");
                }
                Map<String, String> headers = new LinkedHashMap<>();
                if (c.fields().get("headers") instanceof Map<?, ?> m) m.forEach((k, v) -> headers.put(k.toString(), String.valueOf(v)));
                Secret s = c.secrets().get("secret-file");
                return new WebhookChannel(c.name(), url, (String) c.fields().get("template"), headers, s == null ? null : s.reveal(), timeout);
            }
            case "mqtt":
                return new MqttChannel(c.name(), c.string("topic", ""), link, timeout.toMillis());
            case "email": {
                String smtp = c.string("smtp", "");
                int colon = smtp.lastIndexOf(':');
                String host = colon > 0 ? smtp.substring(0, colon) : smtp;
                int port;
                try {
                    port = colon > 0 ? Integer.parseInt(smtp.substring(colon + 1)) : 587;
                } catch (NumberFormatException e) {
                    throw new IllegalArgumentException("channel " + c.name() + ": smtp must be host:port, not '" + smtp + "'");
                }
                SmtpClient.Tls tls = tls(c.string("tls", port == 465 ? "implicit" : "starttls"), c.name());
                Secret pw = c.secrets().get("password-file");
                List<String> to = new ArrayList<>();
                Object t = c.fields().get("to");
                if (t instanceof List<?> l) for (Object o : l) to.add(o.toString()); else if (t != null) to.add(t.toString());
                return new EmailChannel(c.name(), new SmtpClient(host, port, tls, (int) timeout.toMillis(), null),
                        c.string("from", ""), to, (String) c.fields().get("username"), pw == null ? null : pw.reveal(),
                        new MessageText(zone));
            }
            case "command": {
                List<String> argv = new ArrayList<>();
                Object a = c.fields().get("argv");
                if (a instanceof List<?> l) for (Object o : l) argv.add(o.toString()); else if (a != null) argv.add(a.toString());
                if (argv.isEmpty() || argv.get(0).isBlank()) throw new IllegalArgumentException("channel " + c.name() + ": argv is empty");
                return new CommandChannel(c.name(), argv, timeout);
            }
            default:
                throw new IllegalArgumentException("channel " + c.name() + ": unknown type '" + c.type() + "'");
        }
    }

    static SmtpClient.Tls tls(String s, String channel) {
        return switch (s) {
            case "implicit", "tls" -> SmtpClient.Tls.IMPLICIT;
            case "starttls" -> SmtpClient.Tls.STARTTLS;
            case "none" -> SmtpClient.Tls.NONE;
            default -> throw new IllegalArgumentException("channel " + channel + ": tls must be starttls, implicit or none, not '" + s + "'");
        };
    }

    private static Duration duration(ChannelConfig c, String key, Duration fallback) {
        Object v = c.fields().get(key);
        if (v == null) return fallback;
        return Durations.parse(v.toString()).filter(d -> !d.isZero()).orElse(fallback);
    }
}
