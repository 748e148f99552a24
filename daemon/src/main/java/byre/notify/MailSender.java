package byre.notify;

import jakarta.mail.AuthenticationFailedException;
import jakarta.mail.Message;
import jakarta.mail.MessagingException;
import jakarta.mail.SendFailedException;
import jakarta.mail.Session;
import jakarta.mail.internet.InternetAddress;
import jakarta.mail.internet.MimeMessage;
import java.net.ConnectException;
import java.net.SocketTimeoutException;
import java.net.UnknownHostException;
import java.time.Instant;
import java.util.Date;
import java.util.List;
import java.util.Locale;
import java.util.Properties;
import javax.net.ssl.SSLException;
import javax.net.ssl.SSLSocketFactory;
import org.eclipse.angus.mail.smtp.SMTPAddressFailedException;
import org.eclipse.angus.mail.smtp.SMTPSendFailedException;
import org.eclipse.angus.mail.smtp.SMTPTransport;

/**
 * One message through Jakarta Mail (Angus Mail): it uses 8-bit transfer only when the server offers 8BITMIME,
 * encodes and folds the subject (RFC 2047), greets with this computer's name, and checks the server's certificate
 * names its host. The only class that touches Jakarta Mail, so the library is loaded only when an email channel is
 * built. Failures are worded as byre always worded them: the step and the server's reply exactly.
 */
final class MailSender {
    private MailSender() {}

    /** One message; never throws. {@code ssl} null: the JDK's trusted authorities. */
    static DeliveryResult send(EmailChannel.Settings s, SSLSocketFactory ssl, String subject, String body, Instant at, String messageId) {
        String proto = s.tls() == EmailChannel.Tls.IMPLICIT ? "smtps" : "smtp";
        String k = "mail." + proto + ".";
        String ms = Long.toString(s.timeout().toMillis());
        boolean auth = s.username() != null && s.password() != null;
        Properties p = new Properties();
        p.put(k + "host", s.host());
        p.put(k + "port", Integer.toString(s.port()));
        p.put(k + "connectiontimeout", ms);
        p.put(k + "timeout", ms);
        p.put(k + "writetimeout", ms);
        p.put(k + "allow8bitmime", "true");
        p.put(k + "auth", Boolean.toString(auth));
        p.put(k + "auth.mechanisms", "PLAIN LOGIN");
        p.put(k + "ssl.checkserveridentity", "true");
        if (ssl != null) p.put(k + "ssl.socketFactory", ssl);
        if (s.tls() == EmailChannel.Tls.STARTTLS) {
            p.put(k + "starttls.enable", "true");
            p.put(k + "starttls.required", "true");
        }
        String where = s.host() + ":" + s.port();
        SMTPTransport t = null;
        boolean connecting = true;
        try {
            Session session = Session.getInstance(p);
            MimeMessage m = new MimeMessage(session) {
                @Override
                protected void updateMessageID() throws MessagingException {
                    if (messageId == null) super.updateMessageID(); else setHeader("Message-ID", messageId);
                }
            };
            m.setFrom(new InternetAddress(s.from()));
            m.setRecipients(Message.RecipientType.TO, InternetAddress.parse(String.join(", ", s.to())));
            m.setSubject(subject, "UTF-8");
            m.setSentDate(Date.from(at));
            m.setText(body, "UTF-8");
            m.saveChanges();
            t = (SMTPTransport) session.getTransport(proto);
            t.connect(s.host(), s.port(), auth ? s.username() : null, auth ? s.password().reveal() : null);
            connecting = false;
            t.sendMessage(m, m.getAllRecipients());
            return DeliveryResult.success("accepted for " + String.join(", ", s.to()));
        } catch (MessagingException e) {
            return classify(e, t, where, s, connecting);
        } finally {
            if (t != null) {
                try {
                    t.close();
                } catch (MessagingException ignored) {
                    // the message is accepted or the failure reported; a rude goodbye does not matter
                }
            }
        }
    }

    private static DeliveryResult classify(MessagingException e, SMTPTransport t, String where, EmailChannel.Settings s, boolean connecting) {
        for (Throwable c = e; c != null; c = next(c)) {
            if (c instanceof SocketTimeoutException) {
                return DeliveryResult.failure(FailureReason.TIMEOUT, "SMTP server " + where + " did not answer within " + s.timeout().toMillis() + " ms");
            }
            if (c instanceof UnknownHostException) {
                return DeliveryResult.failure(FailureReason.DNS, "cannot resolve SMTP host '" + s.host() + "' (DNS)");
            }
            if (c instanceof ConnectException) {
                return DeliveryResult.failure(FailureReason.REFUSED, "connection to SMTP server " + where + " refused (" + c.getMessage() + ")");
            }
            if (c instanceof SSLException) {
                return DeliveryResult.failure(FailureReason.TLS, "TLS with SMTP server " + where + " failed: " + c.getMessage());
            }
            if (c instanceof SMTPAddressFailedException a) {
                return DeliveryResult.failure(FailureReason.SMTP_REPLY, "RCPT TO " + a.getAddress().getAddress() + " refused: " + oneLine(a.getMessage()));
            }
            if (c instanceof SMTPSendFailedException f && f.getCommand() != null) {
                String cmd = f.getCommand().toUpperCase(Locale.ROOT);
                String step = cmd.startsWith("MAIL FROM") ? "MAIL FROM" : cmd.equals(".") ? "end of DATA (message accepted?)" : cmd;
                return DeliveryResult.failure(FailureReason.SMTP_REPLY, step + " refused: " + oneLine(f.getMessage()));
            }
        }
        String reply = t == null ? null : t.getLastServerResponse();
        if (e instanceof AuthenticationFailedException) {
            String offered = t == null || t.getExtensionParameter("AUTH") == null ? "" : t.getExtensionParameter("AUTH").toUpperCase(Locale.ROOT);
            String step = offered.contains("PLAIN") || !offered.contains("LOGIN") ? "AUTH PLAIN" : "AUTH LOGIN password";
            return DeliveryResult.failure(FailureReason.SMTP_REPLY, step + " refused: " + oneLine(reply == null || reply.isBlank() ? e.getMessage() : reply));
        }
        String msg = e.getMessage() == null ? "" : e.getMessage();
        if (msg.contains("STARTTLS is required")) {
            return DeliveryResult.failure(FailureReason.TLS, "server " + where + " does not offer STARTTLS"
                    + " (set tls: none only on a trusted local network)");
        }
        if (e instanceof SendFailedException) {
            return DeliveryResult.failure(FailureReason.SMTP_REPLY, "the server refused the message: " + oneLine(reply == null ? msg : reply));
        }
        if (connecting && t != null && t.getLastReturnCode() >= 400) {
            // a refused greeting says "Could not connect"; otherwise the server refused EHLO (and byre's HELO after it)
            String step = msg.startsWith("Could not connect") ? "greeting" : "EHLO";
            return DeliveryResult.failure(FailureReason.SMTP_REPLY, step + " refused: " + oneLine(reply));
        }
        return DeliveryResult.failure(FailureReason.IO, "SMTP with " + where + " failed: " + oneLine(msg));
    }

    private static Throwable next(Throwable c) {
        if (c instanceof MessagingException m && m.getNextException() != null && m.getNextException() != c) return m.getNextException();
        return c.getCause() == c ? null : c.getCause();
    }

    /** A multi-line reply as one line, its lines joined by " | ". */
    static String oneLine(String reply) {
        if (reply == null) return "";
        return String.join(" | ", List.of(reply.strip().split("\\r?\\n")));
    }
}
