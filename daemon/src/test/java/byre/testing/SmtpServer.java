package byre.testing;

import jakarta.mail.Session;
import jakarta.mail.internet.MimeMessage;
import java.io.BufferedReader;
import java.io.ByteArrayInputStream;
import java.io.InputStreamReader;
import java.io.OutputStream;
import java.net.InetAddress;
import java.net.ServerSocket;
import java.net.Socket;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.Properties;
import javax.net.ssl.SSLContext;
import javax.net.ssl.SSLSocket;

/** One-connection SMTP server: records the client's lines and the message, answers as configured. */
public final class SmtpServer implements AutoCloseable {
    public final ServerSocket socket;
    public final List<String> received = new ArrayList<>();
    public final StringBuilder data = new StringBuilder();
    public final Thread thread;
    public volatile String rcptReply = "250 2.1.5 ok";
    public volatile String authReply = "235 2.7.0 accepted";
    public volatile boolean eightBit = true;
    /** Offers STARTTLS with this context when set. */
    public volatile SSLContext tls;
    public volatile boolean mailAfterTls;

    public SmtpServer() throws Exception {
        socket = new ServerSocket(0, 5, InetAddress.getLoopbackAddress());
        thread = new Thread(this::serve, "mini-smtp");
        thread.start();
    }

    public int port() {
        return socket.getLocalPort();
    }

    private void serve() {
        try (Socket plain = socket.accept()) {
            plain.setSoTimeout(10_000);
            Socket s = plain;
            BufferedReader in = reader(s);
            OutputStream out = s.getOutputStream();
            boolean secure = false;
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
                if (cmd.startsWith("EHLO")) {
                    say(out, "250-mail.larkmoor.test\r\n" + (tls != null && !secure ? "250-STARTTLS\r\n" : "") + "250-AUTH PLAIN LOGIN\r\n"
                            + (eightBit ? "250-8BITMIME\r\n" : "") + "250 SIZE 1000000");
                } else if (cmd.equals("STARTTLS") && tls != null) {
                    say(out, "220 2.0.0 go ahead");
                    SSLSocket ssl = (SSLSocket) tls.getSocketFactory().createSocket(s, "127.0.0.1", s.getPort(), true);
                    ssl.setUseClientMode(false);
                    ssl.startHandshake();
                    s = ssl;
                    in = reader(s);
                    out = s.getOutputStream();
                    secure = true;
                } else if (cmd.startsWith("AUTH PLAIN")) {
                    if (cmd.equals("AUTH PLAIN")) {
                        say(out, "334 ");
                        synchronized (received) {
                            received.add(in.readLine());
                        }
                    }
                    say(out, authReply);
                } else if (cmd.startsWith("AUTH LOGIN")) {
                    say(out, "334 VXNlcm5hbWU6");
                    in.readLine();
                    say(out, "334 UGFzc3dvcmQ6");
                    in.readLine();
                    say(out, authReply);
                } else if (cmd.startsWith("MAIL FROM")) {
                    mailAfterTls = secure;
                    say(out, "250 2.1.0 ok");
                } else if (cmd.startsWith("RCPT TO")) {
                    say(out, rcptReply);
                } else if (cmd.equals("DATA")) {
                    say(out, "354 end with <CRLF>.<CRLF>");
                    inData = true;
                } else if (cmd.equals("RSET") || cmd.equals("NOOP")) {
                    say(out, "250 2.0.0 ok");
                } else if (cmd.equals("QUIT")) {
                    say(out, "221 bye");
                    return;
                } else {
                    say(out, "500 unknown");
                }
            }
        } catch (Exception ignored) {
            // test ends
        }
    }

    private static BufferedReader reader(Socket s) throws Exception {
        return new BufferedReader(new InputStreamReader(s.getInputStream(), StandardCharsets.UTF_8));
    }

    private static void say(OutputStream out, String reply) throws Exception {
        out.write((reply + "\r\n").getBytes(StandardCharsets.UTF_8));
        out.flush();
    }

    public List<String> received() {
        synchronized (received) {
            return List.copyOf(received);
        }
    }

    /** The message as received, parsed back by Jakarta Mail. */
    public MimeMessage parsed() throws Exception {
        byte[] raw = data.toString().replace("\n", "\r\n").getBytes(StandardCharsets.UTF_8);
        return new MimeMessage(Session.getInstance(new Properties()), new ByteArrayInputStream(raw));
    }

    @Override
    public void close() throws Exception {
        socket.close();
        thread.join(2000);
    }
}
