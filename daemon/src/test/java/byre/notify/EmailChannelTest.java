package byre.notify;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.alerts.AlertEvent;
import byre.alerts.EventKind;
import java.io.BufferedReader;
import java.io.InputStreamReader;
import java.io.OutputStream;
import java.net.InetAddress;
import java.net.ServerSocket;
import java.net.Socket;
import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneId;
import java.util.ArrayList;
import java.util.Base64;
import java.util.List;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;

/** The SMTP client against a minimal SMTP server written here, on loopback (RFC 5321 dialogue). */
class EmailChannelTest {
    static final Instant T0 = Instant.parse("2026-07-14T13:35:00Z");
    static final AlertEvent EVENT = new AlertEvent("e1", "i1", EventKind.RAISED, "larkmoor", "heat-stress", "cows", "warning",
            "thi", 73.4, "", Instant.parse("2026-07-14T13:05:00Z"), T0, "Heat stress in cows: THI 73.4.\n.Check fans", null, List.of(), List.of());

    /** One-connection SMTP server: records the client's lines, answers from a script, rejects RCPT when told. */
    static final class MiniSmtp implements AutoCloseable {
        final ServerSocket socket;
        final List<String> received = new ArrayList<>();
        final StringBuilder data = new StringBuilder();
        final Thread thread;
        volatile String rcptReply = "250 2.1.5 ok";

        MiniSmtp() throws Exception {
            socket = new ServerSocket(0, 5, InetAddress.getLoopbackAddress());
            thread = new Thread(this::serve, "mini-smtp");
            thread.start();
        }

        int port() {
            return socket.getLocalPort();
        }

        private void serve() {
            try (Socket s = socket.accept()) {
                BufferedReader in = new BufferedReader(new InputStreamReader(s.getInputStream(), StandardCharsets.UTF_8));
                OutputStream out = s.getOutputStream();
                say(out, "220 mail.larkmoor.test ESMTP ready");
                String line;
                boolean inData = false;
                while ((line = in.readLine()) != null) {
                    if (inData) {
                        if (line.equals(".")) {
                            inData = false;
                            say(out, "250 2.0.0 queued as 4711");
                        } else {
                            data.append(line).append('\n');
                        }
                        continue;
                    }
                    synchronized (received) {
                        received.add(line);
                    }
                    String cmd = line.toUpperCase();
                    if (cmd.startsWith("EHLO")) say(out, "250-mail.larkmoor.test\r\n250-AUTH PLAIN LOGIN\r\n250 8BITMIME");
                    else if (cmd.startsWith("AUTH PLAIN")) say(out, "235 2.7.0 accepted");
                    else if (cmd.startsWith("MAIL FROM")) say(out, "250 2.1.0 ok");
                    else if (cmd.startsWith("RCPT TO")) say(out, rcptReply);
                    else if (cmd.equals("DATA")) {
                        say(out, "354 end with <CRLF>.<CRLF>");
                        inData = true;
                    } else if (cmd.equals("QUIT")) {
                        say(out, "221 bye");
                        return;
                    } else say(out, "500 unknown");
                }
            } catch (Exception ignored) {
                // test ends
            }
        }

        private static void say(OutputStream out, String reply) throws Exception {
            out.write((reply + "\r\n").getBytes(StandardCharsets.UTF_8));
            out.flush();
        }

        @Override
        public void close() throws Exception {
            socket.close();
            thread.join(2000);
        }
    }

    MiniSmtp server;

    @AfterEach
    void stop() throws Exception {
        if (server != null) server.close();
    }

    EmailChannel channel(String user, String password) {
        return new EmailChannel("office", new SmtpClient("127.0.0.1", server.port(), SmtpClient.Tls.NONE, 5000, null),
                "byre@larkmoor.test", List.of("office@larkmoor.test", "vet@larkmoor.test"), user, password,
                new MessageText(ZoneId.of("Europe/London")));
    }

    @Test
    void sendsAPlainTextMailWithTheExpectedDialogue() throws Exception {
        server = new MiniSmtp();
        DeliveryResult r = channel("byre", "pa55").deliver(EVENT);
        assertTrue(r.ok(), r.toString());
        server.thread.join(2000);
        String plain = Base64.getEncoder().encodeToString("\0byre\0pa55".getBytes(StandardCharsets.UTF_8));
        assertEquals(List.of("EHLO byre.localdomain", "AUTH PLAIN " + plain, "MAIL FROM:<byre@larkmoor.test>",
                "RCPT TO:<office@larkmoor.test>", "RCPT TO:<vet@larkmoor.test>", "DATA", "QUIT"), server.received);
        String mail = server.data.toString();
        assertTrue(mail.contains("Subject: [byre larkmoor] ALERT: heat-stress cows (warning)\n"), mail);
        assertTrue(mail.contains("Content-Type: text/plain; charset=UTF-8\n"), mail);
        assertTrue(mail.contains("Heat stress in cows: THI 73.4.\n"), mail);
        // dot-stuffing (RFC 5321 4.5.2): a line starting with '.' travels as '..'
        assertTrue(mail.contains("\n..Check fans\n"), mail);
        // the body is the event's message, as on every other channel, then the farm's time:
        // 13:35 UTC is 14:35 in London in July (BST, UTC+1)
        assertTrue(mail.contains("\nFarm time: Tue 14 Jul 14:35 BST\n"), mail);
        assertTrue(!mail.contains("Since:"), mail);
    }

    @Test
    void aRejectedRecipientReportsTheExactReply() throws Exception {
        server = new MiniSmtp();
        server.rcptReply = "550 5.1.1 <office@larkmoor.test>: mailbox unavailable";
        DeliveryResult r = channel(null, null).deliver(EVENT);
        assertEquals(FailureReason.SMTP_REPLY, r.reason());
        assertEquals("RCPT TO office@larkmoor.test refused: 550 5.1.1 <office@larkmoor.test>: mailbox unavailable", r.detail());
    }

    @Test
    void starttlsRequiredButNotOfferedIsATlsFailure() throws Exception {
        server = new MiniSmtp();
        DeliveryResult r = new EmailChannel("office", new SmtpClient("127.0.0.1", server.port(), SmtpClient.Tls.STARTTLS, 5000, null),
                "byre@larkmoor.test", List.of("office@larkmoor.test"), null, null, new MessageText(ZoneId.of("UTC"))).deliver(EVENT);
        assertEquals(FailureReason.TLS, r.reason());
        assertTrue(r.detail().contains("does not offer STARTTLS"), r.detail());
    }
}
