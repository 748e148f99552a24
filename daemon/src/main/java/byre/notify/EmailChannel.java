package byre.notify;

import byre.alerts.AlertEvent;
import byre.config.ChannelFields;
import byre.config.Secret;
import byre.units.Suggest;
import java.time.Duration;
import java.time.Instant;
import java.util.List;
import javax.net.ssl.SSLSocketFactory;

/**
 * Sends a short plain-text mail (subject = the headline, body = the event's message and the farm's time) through an
 * SMTP submission server. The sending is done by {@link MailSender} (Jakarta Mail), loaded on the first delivery.
 */
public final class EmailChannel implements Channel {
    static final List<String> TLS_WORDS = List.of("starttls", "implicit", "none");

    /** How the connection is protected: TLS from the first byte (port 465), upgraded with STARTTLS, or plain. */
    public enum Tls { IMPLICIT, STARTTLS, NONE }

    /** {@code tls}: STARTTLS (the default), TLS from the first byte (the default on port 465), or none. */
    public record Settings(String host, int port, Tls tls, String from, List<String> to, String username, Secret password,
                           Duration timeout) {}

    public static final ChannelKind<Settings> KIND = ChannelKind.of("email",
            List.of("smtp", "from", "to", "username", "password-file", "tls", "timeout"), List.of("smtp", "from", "to"), EmailChannel::read,
            (name, s, ctx) -> new EmailChannel(name, s, new MessageText(ctx.zone()), null));

    static Settings read(ChannelFields f) {
        String name = f.channel();
        String smtp = f.string("smtp", "");
        int colon = smtp.lastIndexOf(':');
        String host = colon > 0 ? smtp.substring(0, colon) : smtp;
        int port = 587;
        if (colon > 0) {
            try {
                port = Integer.parseInt(smtp.substring(colon + 1));
            } catch (NumberFormatException e) {
                f.problem("smtp", name + ".smtp must be host:port, not '" + smtp + "'");
            }
        }
        String t = f.string("tls", port == 465 ? "implicit" : "starttls");
        Tls tls = switch (t) {
            case "implicit" -> Tls.IMPLICIT;
            case "starttls" -> Tls.STARTTLS;
            case "none" -> Tls.NONE;
            default -> {
                f.problem("tls", name + ".tls must be starttls, implicit or none, not '" + t + "'" + Suggest.hint(t, TLS_WORDS));
                yield Tls.STARTTLS;
            }
        };
        return new Settings(host, port, tls, f.string("from", ""), List.copyOf(f.list("to")), f.string("username", null),
                f.secretFile("password-file"), f.duration("timeout", ChannelFactory.DEFAULT_TIMEOUT));
    }

    private final String name;
    private final Settings settings;
    private final MessageText text;
    private final SSLSocketFactory ssl;

    /** {@code ssl}: the TLS sockets to use, null for the JDK's trusted authorities (tests pass their own). */
    public EmailChannel(String name, Settings settings, MessageText text, SSLSocketFactory ssl) {
        this.name = name;
        this.settings = settings;
        this.text = text;
        this.ssl = ssl;
    }

    @Override
    public String name() {
        return name;
    }

    @Override
    public String type() {
        return "email";
    }

    @Override
    public DeliveryResult deliver(AlertEvent e) {
        String id = e.id() == null ? null : "<" + e.id() + "@byre." + e.site() + ">";
        return MailSender.send(settings, ssl, text.subject(e), text.body(e), e.at() == null ? Instant.now() : e.at(), id);
    }
}
