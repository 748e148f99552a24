package byre.mqtt;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;

/**
 * Connected time without a message, in seconds for readability. The case it exists for: a client that stops reading
 * after each connection is dropped at the keep-alive and reconnects, over and over; each connection is short, but
 * the quiet adds up across them, so /health can see it. Time without a connection is the broker check's business.
 */
class QuietTest {
    static final long S = 1_000_000_000L;

    @Test
    void addsUpConnectedTimeAcrossReconnectsUntilAMessageArrives() {
        MqttLink.Quiet q = new MqttLink.Quiet();
        q.heard(0);
        q.connected(1 * S);
        assertEquals(9, q.nanos(10 * S) / S);
        q.lost(40 * S);
        assertEquals(39, q.nanos(50 * S) / S, "the outage does not count");
        q.connected(60 * S);
        q.lost(100 * S);
        q.connected(101 * S);
        assertEquals(39 + 40 + 19, q.nanos(120 * S) / S);
        q.heard(125 * S);
        assertEquals(5, q.nanos(130 * S) / S, "a message starts the count again");
        q.lost(131 * S);
        q.connected(200 * S);
        assertEquals(6 + 10, q.nanos(210 * S) / S);
    }
}
