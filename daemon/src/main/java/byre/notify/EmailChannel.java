package byre.notify;

import byre.alerts.AlertEvent;
import byre.config.ChannelFields;
import byre.config.Secret;
import byre.units.Suggest;
import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.time.ZonedDateTime;
import java.time.format.DateTimeFormatter;
import java.util.Base64;
import java.util.List;

/** Sends a short plain-text mail (subject = the headline) through an SMTP submission server. */
public final class EmailChannel implements Channel {
    static final List<String> TLS_WORDS = List.of("starttls", "implicit", "none");

    /** {@code tls}: STARTTLS (the default), TLS from the first byte (the default on port 465), or none. */
    public record Settings(String host, int port, SmtpClient.Tls tls, String from, List<String> to, String username, Secret password,
                           Duration timeout) {}

    public static final ChannelKind<Settings> KIND = ChannelKind.of("email",
            List.of("smtp", "from", "to", "username", "password-file", "tls", "timeout"), List.of("smtp", "from", "to"), EmailChannel::read,
            (name, s, ctx) -> new EmailChannel(name, new SmtpClient(s.host(), s.port(), s.tls(), (int) s.timeout().toMillis(), null),
                    s.from(), s.to(), s.username(), s.password() == null ? null : s.password().reveal(), new MessageText(ctx.zone())));

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
        SmtpClient.Tls tls = switch (t) {
            case "implicit" -> SmtpClient.Tls.IMPLICIT;
            case "starttls" -> SmtpClient.Tls.STARTTLS;
            case "none" -> SmtpClient.Tls.NONE;
            default -> {
                f.problem("tls", name + ".tls must be starttls, implicit or none, not '" + t + "'" + Suggest.hint(t, TLS_WORDS));
                yield SmtpClient.Tls.STARTTLS;
            }
        };
        return new Settings(host, port, tls, f.string("from", ""), List.copyOf(f.list("to")), f.string("username", null),
                f.secretFile("password-file"), f.duration("timeout", ChannelFactory.DEFAULT_TIMEOUT));
    }

    private final String name;
    private final SmtpClient smtp;
    private final String from;
    private final List<String> to;
    private final String username;
    private final String password;
    private final MessageText text;

    public EmailChannel(String name, SmtpClient smtp, String from, List<String> to, String username, String password, MessageText text) {
        this.name = name;
        this.smtp = smtp;
        this.from = from;
        this.to = List.copyOf(to);
        this.username = username;
        this.password = password;
        this.text = text;
    }

    @Override
    public String name() {
        return name;
    }

    @Override
    public String type() {
        return "email";
    }

    /** The message as sent (RFC 5322 headers, UTF-8 text body). */
    public String message(AlertEvent e) {
        StringBuilder sb = new StringBuilder();
        sb.append("From: ").append(from).append("\r\n");
        sb.append("To: ").append(String.join(", ", to)).append("\r\n");
        sb.append("Subject: ").append(header(text.subject(e))).append("\r\n");
        sb.append("Date: ").append(DateTimeFormatter.RFC_1123_DATE_TIME.format(
                e.at() == null ? ZonedDateTime.now() : e.at().atZone(java.time.ZoneOffset.UTC))).append("\r\n");
        if (e.id() != null) sb.append("Message-ID: <").append(e.id()).append("@byre.").append(e.site()).append(">\r\n");
        sb.append("MIME-Version: 1.0\r\n");
        sb.append("Content-Type: text/plain; charset=UTF-8\r\n");
        sb.append("Content-Transfer-Encoding: 8bit\r\n");
        sb.append("\r\n");
        sb.append(text.body(e).replace("\n", "\r\n"));
        return sb.toString();
    }

    /** RFC 2047 encoded word when the header is not plain ASCII. */
    private static String header(String s) {
        if (s.chars().allMatch(c -> c >= 0x20 && c < 0x7f)) return s;
        return "=?UTF-8?B?" + Base64.getEncoder().encodeToString(s.getBytes(StandardCharsets.UTF_8)) + "?=";
    }

    @Override
    public DeliveryResult deliver(AlertEvent event) {
        try {
            smtp.send(from, to, username, password, message(event));
            return DeliveryResult.success("accepted for " + String.join(", ", to));
        } catch (SmtpClient.SmtpException e) {
            return DeliveryResult.failure(e.reason, e.getMessage());
        }
    }
}
