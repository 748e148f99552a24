package byre.history;

import java.util.Arrays;

/**
 * The packed form of a run of one stream's raw readings (the {@code data} of a {@code reading_run} row). Pure: no I/O.
 *
 * <p>Layout: one byte of scale, the count, the first time, then each later time as the gap to the one before, then the
 * values. Times are epoch ms, strictly increasing; gaps are unsigned varints (a reading every 10 s costs 2 bytes).
 * Values are kept exactly: when every value of the run is a decimal with at most {@code e} places ({@code e} = 0..6,
 * the smallest that fits), that is when {@code Math.round(v * 10^e) / 10^e} gives back the very same double, they are
 * stored as those whole numbers, each as the zigzag varint of its difference to the one before (a sensor's next value
 * is usually within a few hundredths: one byte). Otherwise (-0.0, NaN, a value from a calculation) every value of the
 * run is stored as its 8 raw bytes. Decoding gives back the same bits.
 */
final class RunCodec {
    private RunCodec() {}

    /** The largest number of decimal places tried; beyond that a run is stored as raw doubles. */
    static final int MAX_SCALE = 6;
    /** The scale byte of a run stored as raw doubles. */
    static final int RAW = 0x7f;
    /** Whole numbers up to 2^53 are exact doubles: a scaled value beyond that might not come back. */
    private static final double EXACT_LIMIT = 9007199254740992.0;
    private static final double[] POWERS = {1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6};

    /** Times and values of a decoded run, oldest first. */
    record Run(long[] tsMs, double[] values) {
        int size() { return tsMs.length; }

        long first() { return tsMs[0]; }

        long last() { return tsMs[tsMs.length - 1]; }

        /** The index of {@code ts}, or a negative number as {@link Arrays#binarySearch(long[], long)} gives. */
        int indexOf(long ts) { return Arrays.binarySearch(tsMs, ts); }
    }

    /**
     * Packs readings [from, from + n) of the arrays.
     *
     * @throws IllegalArgumentException when n is not positive or the times are not strictly increasing
     */
    static byte[] encode(long[] tsMs, double[] values, int from, int n) {
        if (n <= 0) throw new IllegalArgumentException("a run holds at least one reading, got " + n);
        for (int i = from + 1; i < from + n; i++) {
            if (tsMs[i] <= tsMs[i - 1]) throw new IllegalArgumentException("run times must increase: " + tsMs[i - 1] + " then " + tsMs[i]);
        }
        int scale = scaleOf(values, from, n);
        Out out = new Out(16 + 4 * n);
        out.b(scale);
        out.varint(n);
        out.varint(zigzag(tsMs[from]));
        for (int i = from + 1; i < from + n; i++) out.varint(tsMs[i] - tsMs[i - 1]);
        if (scale == RAW) {
            for (int i = from; i < from + n; i++) out.fixed64(Double.doubleToRawLongBits(values[i]));
        } else {
            double p = POWERS[scale];
            long prev = 0;
            for (int i = from; i < from + n; i++) {
                long s = Math.round(values[i] * p);
                out.varint(zigzag(s - prev));
                prev = s;
            }
        }
        return out.bytes();
    }

    /** Unpacks a run made by {@link #encode}. @throws IllegalArgumentException when the bytes are not such a run */
    static Run decode(byte[] data) {
        In in = new In(data);
        int scale = in.b();
        if (scale != RAW && scale > MAX_SCALE) throw new IllegalArgumentException("run: unknown scale byte " + scale);
        long count = in.varint();
        // Every reading takes at least 2 bytes (gap and value): a count beyond that is a damaged run, not a huge one.
        if (count < 1 || count > data.length) throw new IllegalArgumentException("run: bad count " + count);
        int n = (int) count;
        long[] ts = new long[n];
        double[] values = new double[n];
        ts[0] = unzigzag(in.varint());
        for (int i = 1; i < n; i++) ts[i] = ts[i - 1] + in.varint();
        if (scale == RAW) {
            for (int i = 0; i < n; i++) values[i] = Double.longBitsToDouble(in.fixed64());
        } else {
            double p = POWERS[scale];
            long s = 0;
            for (int i = 0; i < n; i++) {
                s += unzigzag(in.varint());
                values[i] = s / p;
            }
        }
        if (!in.atEnd()) throw new IllegalArgumentException("run: " + (data.length - in.pos) + " bytes left over");
        return new Run(ts, values);
    }

    /** The smallest decimal scale at which every value comes back bit for bit, or {@link #RAW}. */
    static int scaleOf(double[] values, int from, int n) {
        int scale = 0;
        for (int i = from; i < from + n && scale != RAW; i++) {
            while (scale != RAW && !exactAt(values[i], scale)) scale = scale == MAX_SCALE ? RAW : scale + 1;
        }
        return scale;
    }

    private static boolean exactAt(double v, int scale) {
        double p = POWERS[scale];
        double scaled = v * p;
        if (!(Math.abs(scaled) < EXACT_LIMIT)) return false; // also NaN
        return Double.doubleToRawLongBits(Math.round(scaled) / p) == Double.doubleToRawLongBits(v);
    }

    static long zigzag(long v) { return (v << 1) ^ (v >> 63); }

    static long unzigzag(long v) { return (v >>> 1) ^ -(v & 1); }

    private static final class Out {
        private byte[] buf;
        private int len;

        Out(int capacity) { buf = new byte[capacity]; }

        void b(int v) {
            if (len == buf.length) buf = Arrays.copyOf(buf, buf.length * 2);
            buf[len++] = (byte) v;
        }

        /** Unsigned LEB128: 7 bits a byte, low first, the high bit set on every byte but the last. */
        void varint(long v) {
            while ((v & ~0x7fL) != 0) {
                b((int) ((v & 0x7f) | 0x80));
                v >>>= 7;
            }
            b((int) v);
        }

        void fixed64(long v) {
            for (int shift = 56; shift >= 0; shift -= 8) b((int) (v >>> shift));
        }

        byte[] bytes() { return Arrays.copyOf(buf, len); }
    }

    private static final class In {
        private final byte[] buf;
        private int pos;

        In(byte[] buf) { this.buf = buf; }

        int b() {
            if (pos >= buf.length) throw new IllegalArgumentException("run: truncated after " + pos + " bytes");
            return buf[pos++] & 0xff;
        }

        long varint() {
            long v = 0;
            for (int shift = 0; shift < 64; shift += 7) {
                int x = b();
                v |= (long) (x & 0x7f) << shift;
                if ((x & 0x80) == 0) return v;
            }
            throw new IllegalArgumentException("run: varint longer than 10 bytes at " + pos);
        }

        long fixed64() {
            long v = 0;
            for (int i = 0; i < 8; i++) v = (v << 8) | b();
            return v;
        }

        boolean atEnd() { return pos == buf.length; }
    }
}
