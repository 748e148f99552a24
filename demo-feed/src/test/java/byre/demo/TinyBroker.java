package byre.demo;

import java.io.DataInputStream;
import java.io.EOFException;
import java.io.IOException;
import java.io.OutputStream;
import java.net.InetAddress;
import java.net.ServerSocket;
import java.net.Socket;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.CopyOnWriteArrayList;

/**
 * The smallest MQTT 3.1.1 server a publisher can talk to, for tests only: accepts CONNECT,
 * PUBLISH at QoS 0 and 1 (answers PUBACK), PINGREQ and DISCONNECT on 127.0.0.1, and records what
 * it was sent. Packet layouts from the OASIS MQTT 3.1.1 standard, sections 2.2 (fixed header,
 * remaining length) and 3.1-3.4, 3.12-3.14.
 */
final class TinyBroker implements AutoCloseable {
    record Received(String topic, String payload, int qos) {}

    private final ServerSocket server;
    private final Thread acceptor;
    private final List<Socket> sockets = new CopyOnWriteArrayList<>();
    private final List<Thread> handlers = new CopyOnWriteArrayList<>();
    private final List<Received> received = new CopyOnWriteArrayList<>();
    private final List<String> clientIds = new CopyOnWriteArrayList<>();

    TinyBroker() throws IOException {
        server = new ServerSocket(0, 50, InetAddress.getLoopbackAddress());
        acceptor = new Thread(this::acceptLoop, "tiny-broker-accept");
        acceptor.setDaemon(true);
        acceptor.start();
    }

    String uri() { return "tcp://127.0.0.1:" + server.getLocalPort(); }

    List<Received> received() { return new ArrayList<>(received); }

    List<String> clientIds() { return new ArrayList<>(clientIds); }

    private void acceptLoop() {
        while (!server.isClosed()) {
            try {
                Socket s = server.accept();
                sockets.add(s);
                Thread t = new Thread(() -> serve(s), "tiny-broker-conn");
                t.setDaemon(true);
                handlers.add(t);
                t.start();
            } catch (IOException e) {
                return;
            }
        }
    }

    private void serve(Socket s) {
        try (s) {
            DataInputStream in = new DataInputStream(s.getInputStream());
            OutputStream out = s.getOutputStream();
            while (true) {
                int header = in.read();
                if (header < 0) return;
                int length = remainingLength(in);
                byte[] body = new byte[length];
                in.readFully(body);
                int type = header >>> 4;
                switch (type) {
                    case 1: // CONNECT: protocol name, level, flags, keep-alive, then the client id
                        int nameLen = ((body[0] & 0xff) << 8) | (body[1] & 0xff);
                        int at = 2 + nameLen + 4;
                        int idLen = ((body[at] & 0xff) << 8) | (body[at + 1] & 0xff);
                        clientIds.add(new String(body, at + 2, idLen, StandardCharsets.UTF_8));
                        out.write(new byte[] {0x20, 0x02, 0x00, 0x00});
                        break;
                    case 3: { // PUBLISH
                        int qos = (header >>> 1) & 3;
                        int topicLen = ((body[0] & 0xff) << 8) | (body[1] & 0xff);
                        String topic = new String(body, 2, topicLen, StandardCharsets.UTF_8);
                        int p = 2 + topicLen;
                        if (qos > 0) {
                            out.write(new byte[] {0x40, 0x02, body[p], body[p + 1]});
                            p += 2;
                        }
                        received.add(new Received(topic, new String(body, p, length - p, StandardCharsets.UTF_8), qos));
                        break;
                    }
                    case 12: // PINGREQ
                        out.write(new byte[] {(byte) 0xD0, 0x00});
                        break;
                    case 14: // DISCONNECT
                        return;
                    default:
                        return; // not needed by a publisher: drop the connection
                }
                out.flush();
            }
        } catch (IOException e) {
            // connection closed by the client or by close()
        }
    }

    private static int remainingLength(DataInputStream in) throws IOException {
        int value = 0, multiplier = 1, b;
        do {
            b = in.read();
            if (b < 0) throw new EOFException();
            value += (b & 127) * multiplier;
            multiplier *= 128;
        } while ((b & 128) != 0);
        return value;
    }

    @Override
    public void close() throws IOException, InterruptedException {
        server.close();
        for (Socket s : sockets) s.close();
        acceptor.join(2_000);
        for (Thread t : handlers) t.join(2_000);
    }
}
