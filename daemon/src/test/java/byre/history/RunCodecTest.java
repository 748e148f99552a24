package byre.history;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;
import java.util.Random;
import org.junit.jupiter.api.Test;

class RunCodecTest {

    static final long T0 = 1_752_451_200_000L; // 2025-07-14T00:00:00Z

    /** Encodes and decodes, and checks that every time and every value's bits come back. */
    static byte[] roundTrip(long[] ts, double[] values) {
        byte[] data = RunCodec.encode(ts, values, 0, ts.length);
        RunCodec.Run run = RunCodec.decode(data);
        assertArrayEquals(ts, run.tsMs());
        for (int i = 0; i < values.length; i++) {
            assertEquals(Double.doubleToRawLongBits(values[i]), Double.doubleToRawLongBits(run.values()[i]),
                "value " + i + ": " + values[i] + " came back as " + run.values()[i]);
        }
        return data;
    }

    static long[] every10s(int n) {
        long[] ts = new long[n];
        for (int i = 0; i < n; i++) ts[i] = T0 + i * 10_000L;
        return ts;
    }

    @Test
    void aSensorsTwoDecimalReadingsTakeThreeBytesEach() {
        // A dry-bulb temperature wandering by a few hundredths every 10 s.
        Random rnd = new Random(3);
        double[] v = new double[200];
        long c = 2137;
        for (int i = 0; i < v.length; i++) {
            c += rnd.nextInt(7) - 3;
            v[i] = c / 100.0;
        }
        byte[] data = roundTrip(every10s(v.length), v);
        assertEquals(2, data[0], "two decimal places");
        assertTrue(data.length <= 3 * v.length + 12, data.length + " bytes");
    }

    @Test
    void theScaleIsTheSmallestThatKeepsEveryValueExact() {
        assertEquals(0, RunCodec.scaleOf(new double[] {1, -40, 1e12}, 0, 3));
        assertEquals(1, RunCodec.scaleOf(new double[] {21.5, 3}, 0, 2));
        assertEquals(2, RunCodec.scaleOf(new double[] {21.37, 0.1}, 0, 2));
        assertEquals(6, RunCodec.scaleOf(new double[] {0.000001}, 0, 1));
        assertEquals(RunCodec.RAW, RunCodec.scaleOf(new double[] {0.0000001}, 0, 1), "seven places");
        assertEquals(RunCodec.RAW, RunCodec.scaleOf(new double[] {1.0 / 3}, 0, 1));
        assertEquals(RunCodec.RAW, RunCodec.scaleOf(new double[] {21.37, -0.0}, 0, 2), "-0.0 has no whole-number form");
        assertEquals(RunCodec.RAW, RunCodec.scaleOf(new double[] {Double.NaN}, 0, 1));
        assertEquals(RunCodec.RAW, RunCodec.scaleOf(new double[] {1e300}, 0, 1), "beyond 2^53 once scaled");
        assertEquals(1, RunCodec.scaleOf(new double[] {9.9, 1.0 / 3}, 0, 1), "only the given range counts");
    }

    @Test
    void edgeValuesComeBackBitForBit() {
        double[] v = {-0.0, 0.0, 21.37, -21.37, Double.MIN_VALUE, Double.MAX_VALUE, -Double.MAX_VALUE, Double.NaN,
            Double.POSITIVE_INFINITY, Double.NEGATIVE_INFINITY, 0.1 + 0.2, 9007199254740993.0, Math.PI, 1e-300};
        byte[] data = roundTrip(every10s(v.length), v);
        assertEquals(RunCodec.RAW, data[0]);
        roundTrip(new long[] {T0}, new double[] {-0.0});
        roundTrip(new long[] {T0}, new double[] {21.37});
        roundTrip(new long[] {T0, T0 + 1}, new double[] {1e15, -1e15});
        roundTrip(new long[] {T0, T0 + 1}, new double[] {9007199254740992.0, -9007199254740992.0});
        roundTrip(new long[] {T0}, new double[] {0.000001});
    }

    @Test
    void edgeTimesComeBackToo() {
        roundTrip(new long[] {Long.MIN_VALUE, -1, 0, 1, Long.MAX_VALUE}, new double[] {1, 2, 3, 4, 5});
        roundTrip(new long[] {-5_000, -4_999}, new double[] {1, 2});
        roundTrip(new long[] {T0}, new double[] {20});
    }

    @Test
    void randomRunsRoundTrip() {
        Random rnd = new Random(11);
        for (int round = 0; round < 2000; round++) {
            int n = 1 + rnd.nextInt(300);
            long[] ts = new long[n];
            double[] v = new double[n];
            long t = rnd.nextLong() / 4;
            int places = rnd.nextInt(9); // 7 and 8: stored raw
            double p = Math.pow(10, places);
            for (int i = 0; i < n; i++) {
                t += 1 + (rnd.nextInt(4) == 0 ? rnd.nextInt(Integer.MAX_VALUE) : rnd.nextInt(20_000));
                ts[i] = t;
                switch (rnd.nextInt(12)) {
                    case 0 -> v[i] = Double.longBitsToDouble(rnd.nextLong()); // any bits: NaNs of every kind too
                    case 1 -> v[i] = -0.0;
                    case 2 -> v[i] = rnd.nextGaussian() * 1e9;
                    default -> v[i] = Math.round((rnd.nextDouble() * 200 - 100) * p) / p;
                }
            }
            roundTrip(ts, v);
        }
    }

    @Test
    void aSliceOfTheArraysIsPackedAlone() {
        long[] ts = every10s(10);
        double[] v = {1, 2, 3, 4, 5, 6, 7, 8, 9, 10};
        RunCodec.Run run = RunCodec.decode(RunCodec.encode(ts, v, 3, 4));
        assertArrayEquals(Arrays.copyOfRange(ts, 3, 7), run.tsMs());
        assertArrayEquals(new double[] {4, 5, 6, 7}, run.values());
        assertEquals(ts[3], run.first());
        assertEquals(ts[6], run.last());
        assertEquals(1, run.indexOf(ts[4]));
        assertTrue(run.indexOf(ts[4] + 1) < 0);
    }

    @Test
    void badInputIsRefusedWithAMessage() {
        assertThrows(IllegalArgumentException.class, () -> RunCodec.encode(new long[0], new double[0], 0, 0));
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
            () -> RunCodec.encode(new long[] {T0, T0}, new double[] {1, 2}, 0, 2));
        assertTrue(e.getMessage().contains("must increase"), e.getMessage());
        byte[] good = RunCodec.encode(every10s(5), new double[] {1, 2, 3, 4, 5}, 0, 5);
        for (int cut = 0; cut < good.length; cut++) {
            byte[] part = Arrays.copyOf(good, cut);
            assertThrows(IllegalArgumentException.class, () -> RunCodec.decode(part), "cut at " + cut);
        }
        byte[] longer = Arrays.copyOf(good, good.length + 1);
        assertThrows(IllegalArgumentException.class, () -> RunCodec.decode(longer));
        byte[] badScale = good.clone();
        badScale[0] = 9;
        assertThrows(IllegalArgumentException.class, () -> RunCodec.decode(badScale));
    }
}
