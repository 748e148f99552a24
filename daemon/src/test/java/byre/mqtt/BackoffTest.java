package byre.mqtt;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.testing.ManualTicker;
import java.time.Duration;
import org.junit.jupiter.api.Test;

/**
 * The reconnect schedule on a hand-moved ticker. What used to be a wall-clock bound in the broker-restart fault
 * test ("reconnected within 5 s of the broker's return") is a property of this schedule: attempts never wait more
 * than the cap, so byre is back at most the cap (plus one attempt) after the broker. The time a real reconnect
 * takes is printed by the fault test and measured by the benchmarks.
 */
class BackoffTest {
    @Test
    void waitsDoubleFromTheFirstDelayUpToTheCapAndStartOverAfterAConnection() {
        ManualTicker ticker = new ManualTicker();
        Backoff b = new Backoff(ticker, MqttLink.FIRST_BACKOFF, MqttLink.MAX_BACKOFF);
        assertEquals(0, b.waitNanos(), "the first attempt is at once");
        long[] want = {250, 500, 1000, 2000, 4000, 4000, 4000};
        for (long ms : want) {
            b.failed();
            assertEquals(Duration.ofMillis(ms).toNanos(), b.waitNanos());
            ticker.advance(Duration.ofMillis(ms));
            assertEquals(0, b.waitNanos());
        }
        b.connected();
        b.failed();
        assertEquals(Duration.ofMillis(250).toNanos(), b.waitNanos(), "a new loss is retried quickly");
    }

    @Test
    void aReturningBrokerIsReachedWithinTheCapWhateverTheOutage() {
        for (long outageMs = 0; outageMs < 120_000; outageMs += 137) {
            ManualTicker ticker = new ManualTicker();
            long start = ticker.nanos();
            long back = start + Duration.ofMillis(outageMs).toNanos();
            Backoff b = new Backoff(ticker, MqttLink.FIRST_BACKOFF, MqttLink.MAX_BACKOFF);
            // Each attempt fails at once (connection refused) until the broker is back.
            while (ticker.nanos() < back) {
                b.failed();
                ticker.advance(Duration.ofNanos(b.waitNanos()));
            }
            long lateNanos = ticker.nanos() - back;
            assertTrue(lateNanos <= MqttLink.MAX_BACKOFF.toNanos(), "outage " + outageMs + " ms: back " + lateNanos / 1_000_000 + " ms late");
        }
    }
}
