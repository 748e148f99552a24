package byre.demo;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.net.InetAddress;
import java.net.ServerSocket;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.Set;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.stream.Collectors;
import org.junit.jupiter.api.Test;

class FeedPublisherTest {

    /** A sink that keeps what it is given. */
    static final class ListSink implements FeedSink {
        final List<FeedMessage> got = new CopyOnWriteArrayList<>();
        volatile boolean closed;
        @Override public void publish(FeedMessage m) { got.add(m); }
        @Override public void close() { closed = true; }
    }

    @Test
    void flatOutPublishesExactlyTheSimulatedSpanInOrder() throws Exception {
        ListSink sink = new ListSink();
        FeedPublisher p = new FeedPublisher(sink, Double.POSITIVE_INFINITY);
        p.start(new LarkmoorFarm(3), Duration.ofHours(3));
        assertTrue(p.awaitFinished(Duration.ofSeconds(60)));
        assertEquals(new LarkmoorFarm(3).run(Duration.ofHours(3)), sink.got);
        assertEquals(sink.got.size(), p.published());
        assertTrue(sink.closed);
        assertTrue(p.failure().isEmpty());
        assertTrue(p.clock().isEmpty());
    }

    @Test
    void aFailingSinkEndsTheRunWithTheReason() throws Exception {
        FeedSink broken = new FeedSink() {
            @Override public void publish(FeedMessage m) throws IOException { throw new IOException("broker went away"); }
            @Override public void close() {}
        };
        FeedPublisher p = new FeedPublisher(broken, Double.POSITIVE_INFINITY);
        p.start(new LarkmoorFarm(3), null);
        assertTrue(p.awaitFinished(Duration.ofSeconds(30)));
        assertEquals("broker went away", p.failure().orElseThrow().getMessage());
        assertFalse(p.isRunning());
    }

    @Test
    void publishesToAnMqttServerWithQos1AndAUniqueClientId() throws Exception {
        try (TinyBroker broker = new TinyBroker()) {
            FeedPublisher p = FeedPublisher.toBroker(broker.uri(), 1, Double.POSITIVE_INFINITY);
            p.start(new LarkmoorFarm(8), Duration.ofMinutes(30));
            assertTrue(p.awaitFinished(Duration.ofSeconds(60)));
            assertTrue(p.failure().isEmpty(), () -> p.failure().toString());
            List<FeedMessage> expected = new LarkmoorFarm(8).run(Duration.ofMinutes(30));
            List<TinyBroker.Received> got = broker.received();
            assertEquals(expected.size(), got.size());
            for (int i = 0; i < got.size(); i++) {
                assertEquals(expected.get(i).topic(), got.get(i).topic());
                assertEquals(expected.get(i).payloadText(), got.get(i).payload());
                assertEquals(1, got.get(i).qos());
            }
            FeedPublisher q = FeedPublisher.toBroker(broker.uri(), 0, Double.POSITIVE_INFINITY);
            q.stop();
            List<String> ids = broker.clientIds();
            assertEquals(2, ids.size());
            assertNotEquals(ids.get(0), ids.get(1));
            assertTrue(ids.get(0).startsWith("byre-feed-") && ids.get(0).length() <= 23, ids.get(0));
        }
    }

    @Test
    void stopEndsARealTimeRunAndLeavesNoThreadsBehind() throws Exception {
        Set<Thread> before = Thread.getAllStackTraces().keySet();
        try (TinyBroker broker = new TinyBroker()) {
            // speed 1: real time, so 24 simulated hours could not finish during this test
            FeedPublisher p = FeedPublisher.toBroker(broker.uri(), 1, 1.0);
            p.start(new LarkmoorFarm(2), Duration.ofHours(24));
            Clock sim = p.clock().orElseThrow();
            assertFalse(sim.instant().isBefore(LarkmoorFarm.DEFAULT_START));
            waitUntil(() -> p.published() >= 1);   // the first reading is due at once
            assertTrue(p.isRunning());
            p.stop();
            assertFalse(p.isRunning());
            assertTrue(p.published() < 24 * 60, "stop came after the whole day: " + p.published());
            assertTrue(p.failure().isEmpty(), () -> p.failure().toString());
            assertFalse(broker.received().isEmpty());
            // Checked while the broker is still up: a lost connection would also end Paho's threads.
            // They end once the client is closed; give them the moment they need to unwind.
            waitUntil(() -> leftovers(before).isEmpty());
            assertEquals(List.of(), leftovers(before));
        }
    }

    @Test
    void anUnreachableBrokerIsReportedByAddress() throws Exception {
        int port;
        try (ServerSocket s = new ServerSocket(0, 1, InetAddress.getLoopbackAddress())) { port = s.getLocalPort(); }
        String uri = "tcp://127.0.0.1:" + port;
        IOException e = assertThrows(IOException.class, () -> FeedPublisher.toBroker(uri, 1, 60));
        assertTrue(e.getMessage().startsWith("cannot connect to MQTT broker " + uri), e.getMessage());
        IOException bad = assertThrows(IOException.class, () -> FeedPublisher.toBroker("127.0.0.1:1883", 1, 60));
        assertTrue(bad.getMessage().contains("127.0.0.1:1883"), bad.getMessage());
    }

    @Test
    void theSimulatedClockRunsAtTheGivenSpeed() {
        Instant origin = Instant.parse("2026-05-12T11:00:00Z");
        SimClock c = new SimClock(origin, 3600);
        // one simulated hour is one real second away; half a simulated hour is half a second
        long hour = c.nanosUntil(origin.plusSeconds(3600));
        long half = c.nanosUntil(origin.plusSeconds(1800));
        assertTrue(hour <= 1_000_000_000L && hour > half, hour + " / " + half);
        assertTrue(c.nanosUntil(origin.minusSeconds(60)) < 0);
        assertThrows(IllegalArgumentException.class, () -> new SimClock(origin, 0));
    }

    /** Threads started since {@code before} that are still alive and not daemon threads, or are Paho's. */
    private static List<String> leftovers(Set<Thread> before) {
        List<String> out = new ArrayList<>();
        for (Thread t : Thread.getAllStackTraces().keySet()) {
            if (before.contains(t) || !t.isAlive() || t.getName().startsWith("tiny-broker")) continue;
            if (!t.isDaemon() || t.getName().startsWith("MQTT") || t.getName().startsWith("byre-feed")) {
                out.add(t.getName() + (t.isDaemon() ? " (daemon)" : ""));
            }
        }
        return out.stream().sorted().collect(Collectors.toList());
    }

    private static void waitUntil(java.util.function.BooleanSupplier condition) throws InterruptedException {
        for (int i = 0; i < 500 && !condition.getAsBoolean(); i++) Thread.sleep(10);
    }
}
