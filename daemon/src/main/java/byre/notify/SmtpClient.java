package byre.notify;

import java.io.BufferedReader;
import java.io.IOException;
import java.io.InputStreamReader;
import java.io.OutputStream;
import java.net.ConnectException;
import java.net.InetSocketAddress;
import java.net.Socket;
import java.net.SocketTimeoutException;
import java.net.UnknownHostException;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.Base64;
import java.util.List;
import java.util.Locale;
import javax.net.ssl.SSLException;
import javax.net.ssl.SSLSocket;
import javax.net.ssl.SSLSocketFactory;

/**
 * A small SMTP submission client (RFC 5321, STARTTLS RFC 3207, AUTH PLAIN RFC 4616 / LOGIN), one message per
 * connection. Every failure names the step and quotes the server's reply exactly.
 */
public final class SmtpClient {
    /** How the connection is protected: TLS from the first byte (port 465), upgraded with STARTTLS, or plain. */
    public enum Tls { IMPLICIT, STARTTLS, NONE }

    /** A failed step: {@code reply} is the server's reply line(s) as received, null for a network failure. */
    public static final class SmtpException extends Exception {
        final FailureReason reason;

        SmtpException(FailureReason reason, String message) {
            super(message);
            this.reason = reason;
        }
    }

    private final String host;
    private final int port;
    private final Tls tls;
    private final int timeoutMs;
    private final SSLSocketFactory sslFactory;
    private final List<String> dialogue = new ArrayList<>();

    public SmtpClient(String host, int port, Tls tls, int timeoutMs, SSLSocketFactory sslFactory) {
        this.host = host;
        this.port = port;
        this.tls = tls;
        this.timeoutMs = timeoutMs;
        this.sslFactory = sslFactory == null ? (SSLSocketFactory) SSLSocketFactory.getDefault() : sslFactory;
    }

    /** The client's side of the last dialogue ("C: EHLO ...", passwords hidden) and the server's ("S: 250 ..."). */
    public List<String> dialogue() {
        return List.copyOf(dialogue);
    }

    /** Sends one message (headers and body already formatted with CRLF line ends, not dot-stuffed). */
    public void send(String from, List<String> to, String username, String password, String message) throws SmtpException {
        dialogue.clear();
        Socket s = null;
        try {
            s = new Socket();
            s.connect(new InetSocketAddress(host, port), timeoutMs);
            s.setSoTimeout(timeoutMs);
            if (tls == Tls.IMPLICIT) s = upgrade(s);
            Conversation c = new Conversation(s);
            c.expect("greeting", 220);
            List<String> ext = c.command("EHLO " + localName(), "EHLO", 250);
            if (tls == Tls.STARTTLS) {
                if (ext.stream().noneMatch(l -> l.toUpperCase(Locale.ROOT).startsWith("STARTTLS"))) {
                    throw new SmtpException(FailureReason.TLS, "server " + host + ":" + port + " does not offer STARTTLS"
                            + " (set tls: none only on a trusted local network)");
                }
                c.command("STARTTLS", "STARTTLS", 220);
                s = upgrade(s);
                c = new Conversation(s);
                ext = c.command("EHLO " + localName(), "EHLO after STARTTLS", 250);
            }
            if (username != null && password != null) {
                String auth = ext.stream().map(l -> l.toUpperCase(Locale.ROOT)).filter(l -> l.startsWith("AUTH")).findFirst().orElse("");
                if (auth.contains("PLAIN") || !auth.contains("LOGIN")) {
                    String token = Base64.getEncoder().encodeToString(("\0" + username + "\0" + password).getBytes(StandardCharsets.UTF_8));
                    c.secret("AUTH PLAIN " + token, "AUTH PLAIN ****", "AUTH PLAIN", 235);
                } else {
                    c.command("AUTH LOGIN", "AUTH LOGIN", 334);
                    c.secret(b64(username), "****", "AUTH LOGIN user name", 334);
                    c.secret(b64(password), "****", "AUTH LOGIN password", 235);
                }
            }
            c.command("MAIL FROM:<" + from + ">", "MAIL FROM", 250);
            for (String r : to) c.command("RCPT TO:<" + r + ">", "RCPT TO " + r, 250, 251);
            c.command("DATA", "DATA", 354);
            c.data(message);
            c.expect("end of DATA (message accepted?)", 250);
            try {
                c.command("QUIT", "QUIT", 221);
            } catch (SmtpException ignored) {
                // the message is accepted; a rude goodbye does not matter
            }
        } catch (SocketTimeoutException e) {
            throw new SmtpException(FailureReason.TIMEOUT, "SMTP server " + host + ":" + port + " did not answer within " + timeoutMs + " ms");
        } catch (UnknownHostException e) {
            throw new SmtpException(FailureReason.DNS, "cannot resolve SMTP host '" + host + "' (DNS)");
        } catch (ConnectException e) {
            throw new SmtpException(FailureReason.REFUSED, "connection to SMTP server " + host + ":" + port + " refused (" + e.getMessage() + ")");
        } catch (SSLException e) {
            throw new SmtpException(FailureReason.TLS, "TLS with SMTP server " + host + ":" + port + " failed: " + e.getMessage());
        } catch (IOException e) {
            throw new SmtpException(FailureReason.IO, "SMTP with " + host + ":" + port + " failed: " + e.getMessage());
        } finally {
            if (s != null) {
                try {
                    s.close();
                } catch (IOException ignored) {
                    // closing
                }
            }
        }
    }

    private Socket upgrade(Socket plain) throws IOException {
        SSLSocket ssl = (SSLSocket) sslFactory.createSocket(plain, host, port, true);
        var params = ssl.getSSLParameters();
        params.setEndpointIdentificationAlgorithm("HTTPS"); // check the certificate names this host
        ssl.setSSLParameters(params);
        ssl.startHandshake();
        return ssl;
    }

    private static String b64(String s) {
        return Base64.getEncoder().encodeToString(s.getBytes(StandardCharsets.UTF_8));
    }

    private static String localName() {
        return "byre.localdomain";
    }

    /** Reads replies and writes commands on one socket. */
    private final class Conversation {
        private final BufferedReader in;
        private final OutputStream out;

        Conversation(Socket s) throws IOException {
            in = new BufferedReader(new InputStreamReader(s.getInputStream(), StandardCharsets.UTF_8));
            out = s.getOutputStream();
        }

        List<String> command(String line, String step, int... ok) throws IOException, SmtpException {
            return secret(line, line, step, ok);
        }

        List<String> secret(String line, String shown, String step, int... ok) throws IOException, SmtpException {
            dialogue.add("C: " + shown);
            out.write((line + "\r\n").getBytes(StandardCharsets.UTF_8));
            out.flush();
            return expect(step, ok);
        }

        void data(String message) throws IOException {
            StringBuilder sb = new StringBuilder();
            for (String l : message.split("\r?\n", -1)) {
                if (l.startsWith(".")) sb.append('.'); // dot-stuffing, RFC 5321 section 4.5.2
                sb.append(l).append("\r\n");
            }
            sb.append(".\r\n");
            dialogue.add("C: <message, " + sb.length() + " bytes>");
            out.write(sb.toString().getBytes(StandardCharsets.UTF_8));
            out.flush();
        }

        /** Reads one (possibly multi-line) reply; returns the text after the codes, one entry per line. */
        List<String> expect(String step, int... ok) throws IOException, SmtpException {
            List<String> lines = new ArrayList<>();
            StringBuilder raw = new StringBuilder();
            int code;
            while (true) {
                String l = in.readLine();
                if (l == null) throw new SmtpException(FailureReason.SMTP_REPLY, step + ": the server closed the connection"
                        + (raw.length() == 0 ? "" : " after \"" + raw + "\""));
                dialogue.add("S: " + l);
                if (raw.length() > 0) raw.append(" | ");
                raw.append(l);
                if (l.length() < 3) throw new SmtpException(FailureReason.SMTP_REPLY, step + ": malformed reply \"" + l + "\"");
                try {
                    code = Integer.parseInt(l.substring(0, 3));
                } catch (NumberFormatException e) {
                    throw new SmtpException(FailureReason.SMTP_REPLY, step + ": malformed reply \"" + l + "\"");
                }
                lines.add(l.length() > 4 ? l.substring(4) : "");
                if (l.length() == 3 || l.charAt(3) != '-') break;
            }
            for (int c : ok) if (c == code) return lines;
            throw new SmtpException(FailureReason.SMTP_REPLY, step + " refused: " + raw);
        }
    }
}
