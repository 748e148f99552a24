package byre.notify;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.alerts.AlertEvent;
import byre.alerts.EventKind;
import byre.config.Secret;
import byre.testing.SmtpServer;
import byre.testing.TestCertificate;
import jakarta.mail.Session;
import jakarta.mail.internet.MimeMessage;
import java.io.BufferedReader;
import java.io.ByteArrayInputStream;
import java.io.InputStream;
import java.io.InputStreamReader;
import java.io.OutputStream;
import java.net.InetAddress;
import java.net.ServerSocket;
import java.net.Socket;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.security.KeyStore;
import java.security.cert.Certificate;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneId;
import java.util.ArrayList;
import java.util.Base64;
import java.util.List;
import java.util.Properties;
import java.util.concurrent.TimeUnit;
import javax.net.ssl.KeyManagerFactory;
import javax.net.ssl.SSLContext;
import javax.net.ssl.SSLSocket;
import javax.net.ssl.SSLSocketFactory;
import javax.net.ssl.TrustManagerFactory;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The email channel against a small SMTP server written here, on loopback (RFC 5321, STARTTLS RFC 3207, 8BITMIME RFC 6152). */
class EmailChannelTest {
    static final Instant T0 = Instant.parse("2026-07-14T13:35:00Z");
    static final AlertEvent EVENT = event("heat-stress", "cows", "Heat stress in cows: THI 73.4.\n.Check fans");

    static AlertEvent event(String watch, String zone, String message) {
        return new AlertEvent("e1", "i1", EventKind.RAISED, "larkmoor", watch, zone, "warning", "thi", 73.4, "",
                Instant.parse("2026-07-14T13:05:00Z"), T0, message, null, List.of(), List.of());
    }

    @TempDir
    Path dir;

    SmtpServer server;

    @AfterEach
    void stop() throws Exception {
        if (server != null) server.close();
    }

    EmailChannel channel(EmailChannel.Tls tls, String user, String password, SSLSocketFactory ssl) {
        return new EmailChannel("office", new EmailChannel.Settings("127.0.0.1", server.port(), tls, "byre@larkmoor.test",
                List.of("office@larkmoor.test", "vet@larkmoor.test"), user, password == null ? null : new Secret(password, "test"),
                Duration.ofSeconds(5)), new MessageText(ZoneId.of("Europe/London")), ssl);
    }

    EmailChannel channel(String user, String password) {
        return channel(EmailChannel.Tls.NONE, user, password, null);
    }

    @Test
    void sendsAPlainTextMailWithTheExpectedDialogue() throws Exception {
        server = new SmtpServer();
        DeliveryResult r = channel("byre", "pa55").deliver(EVENT);
        assertTrue(r.ok(), r.toString());
        server.thread.join(2000);
        // RFC 4616: authorisation id (empty or the user's own), user name, password
        List<String> plain = List.of(Base64.getEncoder().encodeToString("\0byre\0pa55".getBytes(StandardCharsets.UTF_8)),
                Base64.getEncoder().encodeToString("byre\0byre\0pa55".getBytes(StandardCharsets.UTF_8)));
        List<String> got = server.received();
        // EHLO names this computer (RFC 5321 4.1.1.1), not a made-up name
        assertEquals("EHLO " + InetAddress.getLocalHost().getCanonicalHostName(), got.get(0));
        assertTrue(plain.stream().anyMatch(p -> got.get(1).equals("AUTH PLAIN " + p)), got.toString());
        assertEquals(List.of("MAIL FROM:<byre@larkmoor.test>", "RCPT TO:<office@larkmoor.test>", "RCPT TO:<vet@larkmoor.test>", "DATA", "QUIT"),
                got.subList(got.indexOf("DATA") - 3, got.size()).stream().map(l -> l.replace(" BODY=8BITMIME", "")).toList());
        String mail = server.data.toString();
        assertTrue(mail.contains("Subject: [byre larkmoor] ALERT: heat-stress cows (warning)\n"), mail);
        assertTrue(mail.contains("Content-Type: text/plain; charset=UTF-8\n"), mail);
        assertTrue(mail.contains("Message-ID: <e1@byre.larkmoor>\n"), mail);
        assertTrue(mail.contains("Heat stress in cows: THI 73.4.\n"), mail);
        // dot-stuffing (RFC 5321 4.5.2): a line starting with '.' travels as '..'
        assertTrue(mail.contains("\n..Check fans\n"), mail);
        // the body is the event's message, as on every other channel, then the farm's time:
        // 13:35 UTC is 14:35 in London in July (BST, UTC+1)
        assertTrue(mail.contains("\nFarm time: Tue 14 Jul 14:35 BST\n"), mail);
        assertTrue(!mail.contains("Since:"), mail);
    }

    @Test
    void eightBitTravelsOnlyToAServerThatOffersIt() throws Exception {
        AlertEvent e = event("heat-stress", "kälberstall", "Hitzestress im Kälberstall: 31 °C.");
        server = new SmtpServer();
        assertTrue(channel(null, null).deliver(e).ok());
        server.thread.join(2000);
        assertTrue(server.data.toString().contains("Content-Transfer-Encoding: 8bit\n"), server.data.toString());
        assertTrue(server.parsed().getContent().toString().replace("\r\n", "\n").startsWith("Hitzestress im Kälberstall: 31 °C.\n"));
        server.close();

        server = new SmtpServer();
        server.eightBit = false;
        assertTrue(channel(null, null).deliver(e).ok());
        server.thread.join(2000);
        String mail = server.data.toString();
        assertTrue(mail.chars().allMatch(c -> c < 0x80), "only 7-bit bytes to a server without 8BITMIME:\n" + mail);
        assertFalse(mail.contains("Content-Transfer-Encoding: 8bit"), mail);
        assertTrue(server.parsed().getContent().toString().replace("\r\n", "\n").startsWith("Hitzestress im Kälberstall: 31 °C.\n"));
    }

    @Test
    void aLongEncodedSubjectIsFolded() throws Exception {
        AlertEvent e = event("hitzestress-überwachung-im-kälberstall-nord", "kälberstall-nord-mit-iglus-und-außenausläufen", "Hitzestress.");
        server = new SmtpServer();
        assertTrue(channel(null, null).deliver(e).ok());
        server.thread.join(2000);
        String head = server.data.toString().split("\n\n", 2)[0];
        // RFC 5322 2.1.1: lines of at most 78 characters; RFC 2047 2: encoded words of at most 75
        for (String l : head.split("\n")) assertTrue(l.length() <= 78, "too long: " + l);
        assertTrue(head.contains("Subject: =?UTF-8?"), head);
        assertEquals(new MessageText(ZoneId.of("UTC")).subject(e), server.parsed().getSubject());
    }

    @Test
    void sendsOverStarttlsWithACertificateForTheHost() throws Exception {
        TestCertificate t = TestCertificate.make(dir);
        server = new SmtpServer();
        server.tls = t.server();
        DeliveryResult r = channel(EmailChannel.Tls.STARTTLS, "byre", "pa55", t.client().getSocketFactory()).deliver(EVENT);
        assertTrue(r.ok(), r.toString());
        server.thread.join(2000);
        List<String> got = server.received();
        assertEquals("STARTTLS", got.get(1));
        assertTrue(got.get(2).startsWith("EHLO "), got.toString());
        assertTrue(server.mailAfterTls, "the password and the message travel only after the upgrade");
        assertTrue(server.data.toString().contains("Heat stress in cows: THI 73.4.\n"));
    }

    @Test
    void aCertificateTheJdkDoesNotTrustIsATlsFailure() throws Exception {
        TestCertificate t = TestCertificate.make(dir);
        server = new SmtpServer();
        server.tls = t.server();
        DeliveryResult r = channel(EmailChannel.Tls.STARTTLS, null, null, null).deliver(EVENT);
        assertEquals(FailureReason.TLS, r.reason(), r.toString());
        assertTrue(r.detail().startsWith("TLS with SMTP server 127.0.0.1:" + server.port() + " failed: "), r.detail());
    }

    @Test
    void refusedAuthenticationReportsTheExactReply() throws Exception {
        server = new SmtpServer();
        server.authReply = "535 5.7.8 Authentication credentials invalid";
        DeliveryResult r = channel("byre", "wrong").deliver(EVENT);
        assertEquals(FailureReason.SMTP_REPLY, r.reason(), r.toString());
        assertEquals("AUTH PLAIN refused: 535 5.7.8 Authentication credentials invalid", r.detail());
    }

    @Test
    void aRejectedRecipientReportsTheExactReply() throws Exception {
        server = new SmtpServer();
        server.rcptReply = "550 5.1.1 <office@larkmoor.test>: mailbox unavailable";
        DeliveryResult r = channel(null, null).deliver(EVENT);
        assertEquals(FailureReason.SMTP_REPLY, r.reason());
        assertEquals("RCPT TO office@larkmoor.test refused: 550 5.1.1 <office@larkmoor.test>: mailbox unavailable", r.detail());
    }

    @Test
    void starttlsRequiredButNotOfferedIsATlsFailure() throws Exception {
        server = new SmtpServer();
        DeliveryResult r = channel(EmailChannel.Tls.STARTTLS, null, null, null).deliver(EVENT);
        assertEquals(FailureReason.TLS, r.reason());
        assertEquals("server 127.0.0.1:" + server.port() + " does not offer STARTTLS (set tls: none only on a trusted local network)", r.detail());
    }

    @Test
    void aClosedPortIsRefused() throws Exception {
        int port;
        try (ServerSocket s = new ServerSocket(0, 1, InetAddress.getLoopbackAddress())) {
            port = s.getLocalPort();
        }
        DeliveryResult r = new EmailChannel("office", new EmailChannel.Settings("127.0.0.1", port, EmailChannel.Tls.NONE, "byre@larkmoor.test",
                List.of("office@larkmoor.test"), null, null, Duration.ofSeconds(5)), new MessageText(ZoneId.of("UTC")), null).deliver(EVENT);
        assertEquals(FailureReason.REFUSED, r.reason(), r.toString());
        assertTrue(r.detail().startsWith("connection to SMTP server 127.0.0.1:" + port + " refused ("), r.detail());
    }

}
