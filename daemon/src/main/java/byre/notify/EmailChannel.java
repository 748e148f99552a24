package byre.notify;

import byre.alerts.AlertEvent;
import java.nio.charset.StandardCharsets;
import java.time.ZonedDateTime;
import java.time.format.DateTimeFormatter;
import java.util.Base64;
import java.util.List;

/** Sends a short plain-text mail (subject = the headline) through an SMTP submission server. */
public final class EmailChannel implements Channel {
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
