package byre.mqtt;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.config.MqttSettings;
import byre.testing.RawMqtt;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.FileInputStream;
import java.io.IOException;
import java.io.InputStream;
import java.net.InetAddress;
import java.net.InetSocketAddress;
import java.net.ServerSocket;
import java.net.SocketTimeoutException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.security.KeyStore;
import java.time.Duration;
import java.util.HexFormat;
import java.util.List;
import java.util.Random;
import java.util.UUID;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.concurrent.TimeUnit;
import javax.net.ssl.KeyManagerFactory;
import javax.net.ssl.SSLContext;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.Timeout;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/**
 * A PUBLISH whose topic the MQTT client cannot decode used to kill the client's reading thread: nothing more was
 * read until the keep-alive ran out, and after the reconnect the broker sent the same message again. Here a
 * hand-written broker (plain TCP and TLS) forwards such topics, which a good broker refuses; the link must drop
 * each one (counted, acknowledged, so it is not sent again) and go on delivering on the same connection.
 */
class PublishTopicGuardTest {
    @TempDir
    Path dir;

    /** Hex in, hex out: '23' is the mark. What the client accepts is the MQTT 3.1.1 section 1.5.3 rule. */
    @ParameterizedTest
    @CsvSource({
            "6c61726b6d6f6f722f612f62, 6c61726b6d6f6f722f612f62", // plain ASCII kept
            "612f00, 612f23",                 // NUL
            "610962, 612362",                 // tab: a control character
            "617f62, 612362",                 // DEL
            "61c28562, 61232362",             // U+0085, a C1 control character
            "61ff62, 612362",                 // not UTF-8 at all
            "61c062, 612362",                 // a lead byte that is always an over-long form
            "61e0808062, 6123232362",         // over-long three-byte NUL
            "61eda08062, 6123232362",         // an encoded surrogate
            "61efbfbe62, 6123232362",         // U+FFFE, a non-character
            "61efb79062, 6123232362",         // U+FDD0, a non-character
            "61e2809362, 61e2809362",         // U+2013 en dash: valid, kept
            "61f09f908462, 61f09f908462",     // U+1F404 cow: valid four-byte form, kept
            "61c3, 6123",                     // a sequence cut off at the end
            "61c3a962, 61c3a962",             // U+00E9: kept
    })
    void repairMarksEveryByteTheClientRefuses(String in, String want) {
        byte[] b = HexFormat.of().parseHex(in);
        PublishTopicGuard.repair(b, 0, b.length);
        assertEquals(want, HexFormat.of().formatHex(b));
    }

    /** Packets of every kind, read in pieces of random size and with read timeouts in between: only topics change. */
    @Test
    void theGuardFollowsPacketsAcrossShortReadsAndTimeouts() throws IOException {
        ByteArrayOutputStream wire = new ByteArrayOutputStream();
        ByteArrayOutputStream want = new ByteArrayOutputStream();
        Random rnd = new Random(11);
        for (int i = 0; i < 300; i++) {
            byte[] payload = new byte[rnd.nextInt(3) == 0 ? 300 : rnd.nextInt(40)];
            rnd.nextBytes(payload); // a payload may hold anything: never touched
            boolean bad = i % 3 == 0;
            byte[] topic = ("larkmoor/pen" + i + (bad ? "\u0000x" : "/dry")).getBytes(StandardCharsets.UTF_8);
            byte[] fixed = ("larkmoor/pen" + i + (bad ? "#x" : "/dry")).getBytes(StandardCharsets.UTF_8);
            int qos = i % 2;
            wire.writeBytes(RawMqtt.publishPacket(topic, payload, qos, i + 1, false));
            want.writeBytes(RawMqtt.publishPacket(fixed, payload, qos, i + 1, false));
            byte[] other = i % 5 == 0 ? new byte[] {(byte) 0xd0, 0x00} : new byte[] {0x40, 0x02, 0x00, (byte) i};
            wire.writeBytes(other);
            want.writeBytes(other);
        }
        byte[] bytes = wire.toByteArray();
        InputStream choppy = new InputStream() {
            int pos;

            @Override
            public int read() throws IOException {
                byte[] one = new byte[1];
                return read(one, 0, 1) < 0 ? -1 : one[0] & 0xff;
            }

            @Override
            public int read(byte[] b, int off, int len) throws IOException {
                if (rnd.nextInt(7) == 0) throw new SocketTimeoutException("read timed out");
                if (pos == bytes.length) return -1;
                int n = Math.min(Math.min(len, 1 + rnd.nextInt(9)), bytes.length - pos);
                System.arraycopy(bytes, pos, b, off, n);
                pos += n;
                return n;
            }
        };
        PublishTopicGuard guard = new PublishTopicGuard(choppy);
        ByteArrayOutputStream got = new ByteArrayOutputStream();
        byte[] buf = new byte[64];
        while (true) {
            try {
                if (rnd.nextBoolean()) {
                    int c = guard.read(); // the client reads the fixed header a byte at a time
                    if (c < 0) break;
                    got.write(c);
                } else {
                    int n = guard.read(buf, 0, 1 + rnd.nextInt(buf.length));
                    if (n < 0) break;
                    got.write(buf, 0, n);
                }
            } catch (SocketTimeoutException e) {
                // as the client does: read again
            }
        }
        assertArrayEquals(want.toByteArray(), got.toByteArray());
    }

    @Test
    @Timeout(60)
    void overPlainTcpABadTopicIsDroppedAndTheNextMessageArrivesOnTheSameConnection() throws Exception {
        ServerSocket server = new ServerSocket();
        server.bind(new InetSocketAddress(InetAddress.getLoopbackAddress(), 0));
        checkLink(server, "tcp://127.0.0.1:" + server.getLocalPort(), null);
    }

    @Test
    @Timeout(60)
    void overTlsABadTopicIsDroppedAndTheNextMessageArrivesOnTheSameConnection() throws Exception {
        // A key and certificate for 127.0.0.1 from the JDK's keytool; the link trusts exactly that certificate.
        Path ks = dir.resolve("broker.p12");
        Path ca = dir.resolve("ca.pem");
        run("keytool", "-genkeypair", "-alias", "broker", "-keyalg", "EC", "-groupname", "secp256r1", "-dname", "CN=127.0.0.1",
                "-ext", "SAN=ip:127.0.0.1", "-validity", "2", "-storetype", "PKCS12", "-keystore", ks.toString(),
                "-storepass", "larkmoor", "-keypass", "larkmoor");
        run("keytool", "-exportcert", "-rfc", "-alias", "broker", "-keystore", ks.toString(), "-storepass", "larkmoor",
                "-file", ca.toString());
        KeyStore store = KeyStore.getInstance("PKCS12");
        try (FileInputStream in = new FileInputStream(ks.toFile())) {
            store.load(in, "larkmoor".toCharArray());
        }
        KeyManagerFactory kmf = KeyManagerFactory.getInstance(KeyManagerFactory.getDefaultAlgorithm());
        kmf.init(store, "larkmoor".toCharArray());
        SSLContext ctx = SSLContext.getInstance("TLS");
        ctx.init(kmf.getKeyManagers(), null, null);
        ServerSocket server = ctx.getServerSocketFactory().createServerSocket(0, 50, InetAddress.getLoopbackAddress());
        checkLink(server, "ssl://127.0.0.1:" + server.getLocalPort(), ca.toString());
    }

    private void checkLink(ServerSocket server, String uri, String caFile) throws Exception {
        List<byte[]> deliveries = List.of(
                RawMqtt.publishPacket("larkmoor/cow-shed/dr\u0000y".getBytes(StandardCharsets.UTF_8), "21.5".getBytes(StandardCharsets.UTF_8), 1, 1, false),
                RawMqtt.publishPacket(new byte[] {'l', 'a', 'r', 'k', '/', (byte) 0xff}, "1".getBytes(StandardCharsets.UTF_8), 0, 0, false),
                RawMqtt.publishPacket("larkmoor/cow-shed/dry".getBytes(StandardCharsets.UTF_8), "21.6".getBytes(StandardCharsets.UTF_8), 1, 2, false));
        SimpleMeterRegistry registry = new SimpleMeterRegistry();
        List<String> got = new CopyOnWriteArrayList<>();
        try (FakeBroker broker = new FakeBroker(server, deliveries)) {
            MqttLink link = new MqttLink(new MqttSettings(uri, null, 0, "byre-guard-" + UUID.randomUUID().toString().substring(0, 8),
                    null, null, "byre", 1, caFile), "larkmoor", registry);
            link.subscribeAcked("larkmoor/#", (topic, payload, retained, ack) -> {
                got.add(topic + "=" + new String(payload, StandardCharsets.UTF_8));
                if (ack != null) ack.run();
            });
            link.start();
            try {
                await().atMost(Duration.ofSeconds(15)).until(() -> got.contains("larkmoor/cow-shed/dry=21.6"));
                await().atMost(Duration.ofSeconds(5)).until(() -> broker.acknowledged.containsAll(List.of(1, 2)));
                assertEquals(List.of("larkmoor/cow-shed/dry=21.6"), got, "the bad topics never reach a handler");
                assertEquals(2.0, registry.counter("byre.mqtt.messages.dropped", "reason", "invalid-topic").count());
                assertEquals(1, broker.connections.get(), "no reconnect was needed");
                assertTrue(link.isConnected());
            } finally {
                link.close();
            }
        }
    }

    private static void run(String... command) throws Exception {
        Process p = new ProcessBuilder(command).redirectErrorStream(true).start();
        String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        assertTrue(p.waitFor(60, TimeUnit.SECONDS) && p.exitValue() == 0, String.join(" ", command) + ": " + out);
    }
}
