package byre.testing;

import java.io.ByteArrayOutputStream;
import java.io.DataInputStream;
import java.io.IOException;
import java.io.InputStream;
import java.io.OutputStream;
import java.net.Socket;
import java.nio.charset.StandardCharsets;

/**
 * MQTT 3.1.1 packets built by hand, for what a library refuses to send (a topic with a NUL or bytes that are
 * not UTF-8): a raw publisher over a plain socket, and the packet pieces a fake broker needs.
 */
public final class RawMqtt implements AutoCloseable {
    private final Socket socket;
    private final OutputStream out;
    private final DataInputStream in;

    /** Connects to a broker on 127.0.0.1 (clean session, 60 s keep-alive) and waits for its CONNACK. */
    public RawMqtt(int port, String clientId) throws IOException {
        socket = new Socket("127.0.0.1", port);
        socket.setSoTimeout(10_000);
        out = socket.getOutputStream();
        in = new DataInputStream(socket.getInputStream());
        out.write(connect(clientId));
        out.flush();
        Packet ack = read(in);
        if (ack.type() != 2 || ack.body()[1] != 0) throw new IOException("connection refused: CONNACK code " + ack.body()[1]);
    }

    /** Publishes at QoS 1 with packet id {@code id}; returns whether the broker acknowledged it (false: it hung up). */
    public boolean publish(byte[] topic, byte[] payload, int id) throws IOException {
        out.write(publishPacket(topic, payload, 1, id, false));
        out.flush();
        try {
            Packet p = read(in);
            return p.type() == 4;
        } catch (IOException closed) {
            return false;
        }
    }

    @Override
    public void close() throws IOException {
        socket.close();
    }

    /** A packet as read: its type (high nibble of the first byte), flags and body. */
    public record Packet(int type, int flags, byte[] body) {}

    public static Packet read(InputStream in) throws IOException {
        int first = in.read();
        if (first < 0) throw new java.io.EOFException();
        int len = 0;
        int shift = 0;
        int c;
        do {
            c = in.read();
            if (c < 0) throw new java.io.EOFException();
            len |= (c & 0x7f) << shift;
            shift += 7;
        } while ((c & 0x80) != 0);
        byte[] body = new DataInputStream(in).readNBytes(len);
        if (body.length < len) throw new java.io.EOFException();
        return new Packet(first >> 4, first & 0x0f, body);
    }

    public static byte[] connect(String clientId) {
        ByteArrayOutputStream v = new ByteArrayOutputStream();
        string(v, "MQTT".getBytes(StandardCharsets.US_ASCII));
        v.write(4);    // protocol level 3.1.1
        v.write(0x02); // clean session
        v.write(0);
        v.write(60);   // keep-alive, s
        string(v, clientId.getBytes(StandardCharsets.UTF_8));
        return packet(0x10, v.toByteArray());
    }

    public static byte[] publishPacket(byte[] topic, byte[] payload, int qos, int id, boolean retain) {
        ByteArrayOutputStream v = new ByteArrayOutputStream();
        string(v, topic);
        if (qos > 0) {
            v.write(id >> 8);
            v.write(id);
        }
        v.writeBytes(payload);
        return packet(0x30 | (qos << 1) | (retain ? 1 : 0), v.toByteArray());
    }

    public static byte[] packet(int first, byte[] body) {
        ByteArrayOutputStream p = new ByteArrayOutputStream();
        p.write(first);
        int len = body.length;
        do {
            int b = len % 128;
            len /= 128;
            p.write(len > 0 ? b | 0x80 : b);
        } while (len > 0);
        p.writeBytes(body);
        return p.toByteArray();
    }

    private static void string(ByteArrayOutputStream v, byte[] s) {
        v.write(s.length >> 8);
        v.write(s.length);
        v.writeBytes(s);
    }
}
