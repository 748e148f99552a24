package byre.daemon;

import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

/** The pipeline thread naps to gather zone readings only in a burst, never at a barn's live rate. */
class BurstGaugeTest {
    static final long US = 1_000L;
    static final long MS = 1_000_000L;

    @Test
    void aBarnAtFullRateIsNoBurstEvenWithCloseNeighbours() {
        BurstGauge g = new BurstGauge();
        long t = 0;
        for (int i = 0; i < 2000; i++) {
            // 200 derivations a second of 3 zone readings each, every other one right behind the one before
            t += i % 2 == 0 ? 100 * US : 9900 * US;
            g.batch(t, 3);
            assertFalse(g.inBurst(), "batch " + i);
        }
    }

    @Test
    void aBurstIsRecognisedStaysOneWhileGatheringAndEndsWithTheFirstPause() {
        BurstGauge g = new BurstGauge();
        assertFalse(g.inBurst(), "nothing seen yet");
        long t = 0;
        for (int i = 0; i < 100; i++) g.batch(t += 100 * US, 2);
        assertTrue(g.inBurst(), "20,000 zone readings a second, taken as they come");
        for (int i = 0; i < 100; i++) g.batch(t += 2200 * US, 44);
        assertTrue(g.inBurst(), "the same rate gathered: 2 ms naps, bigger batches");
        g.batch(t += 1000 * MS, 1);
        assertFalse(g.inBurst(), "one pause of a second ends it");
    }

    @Test
    void theFirstBatchesOfABurstGoAtOnce() {
        BurstGauge g = new BurstGauge();
        long t = 0;
        g.batch(t, 1);
        for (int i = 0; i < 10; i++) {
            g.batch(t += 100 * US, 2);
            assertFalse(g.inBurst(), "a handful of close batches after a quiet spell is no burst yet");
        }
    }
}
