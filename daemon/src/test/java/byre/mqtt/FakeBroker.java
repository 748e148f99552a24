package byre.mqtt;

import byre.testing.RawMqtt;
import java.io.IOException;
import java.io.InputStream;
import java.io.OutputStream;
import java.net.ServerSocket;
import java.net.Socket;
import java.util.List;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.concurrent.atomic.AtomicInteger;

/**
 * A hand-written MQTT 3.1.1 broker for one client at a time, standing in for a broker that forwards what a good one
 * refuses: after each SUBSCRIBE of a connection it sends {@code deliveries} (every connection again, as a broker
 * redelivers what was not acknowledged). It answers CONNECT, SUBSCRIBE, PINGREQ and QoS 1 PUBLISH, and records the
 * packet id of every PUBACK the client sends, in order, repeats included.
 */
final class FakeBroker implements AutoCloseable {
    private final ServerSocket server;
    private final List<byte[]> deliveries;
    private final Thread thread;
    final List<Integer> acknowledged = new CopyOnWriteArrayList<>();
    final AtomicInteger connections = new AtomicInteger();
    private volatile Socket current;

    FakeBroker(ServerSocket server, List<byte[]> deliveries) {
        this.server = server;
        this.deliveries = deliveries;
        this.thread = new Thread(this::run, "fake-broker");
        thread.setDaemon(true);
        thread.start();
    }

    int port() {
        return server.getLocalPort();
    }

    private void run() {
        while (!server.isClosed()) {
            try (Socket s = server.accept()) {
                current = s;
                connections.incrementAndGet();
                serve(s.getInputStream(), s.getOutputStream());
            } catch (IOException e) {
                // the client went away or the test is over: wait for the next connection
            }
        }
    }

    private void serve(InputStream in, OutputStream out) throws IOException {
        while (true) {
            RawMqtt.Packet p = RawMqtt.read(in);
            byte[] b = p.body();
            switch (p.type()) {
                case 1 -> out.write(new byte[] {0x20, 0x02, 0x00, 0x00});
                case 8 -> {
                    out.write(new byte[] {(byte) 0x90, 0x03, b[0], b[1], 0x01});
                    for (byte[] d : deliveries) out.write(d);
                }
                case 3 -> {
                    if (((p.flags() >> 1) & 3) == 1) {
                        int topicLen = ((b[0] & 0xff) << 8) | (b[1] & 0xff);
                        out.write(new byte[] {0x40, 0x02, b[2 + topicLen], b[3 + topicLen]});
                    }
                }
                case 4 -> acknowledged.add(((b[0] & 0xff) << 8) | (b[1] & 0xff));
                case 12 -> out.write(new byte[] {(byte) 0xd0, 0x00});
                case 14 -> {
                    return;
                }
                default -> { }
            }
            out.flush();
        }
    }

    @Override
    public void close() throws IOException {
        server.close();
        Socket s = current;
        if (s != null) s.close();
    }
}
