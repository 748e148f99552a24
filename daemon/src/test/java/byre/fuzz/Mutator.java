package byre.fuzz;

import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;

/**
 * A seeded mutation fuzzer: takes a corpus of valid inputs and makes one malformed variant per call by
 * byte flips, truncation, insertion of tokens of the input's grammar, splicing two corpus entries, deep
 * nesting, huge or odd numbers and invalid UTF-8. The same seed gives the same sequence, so a failure
 * message carrying the iteration number is enough to reproduce it.
 */
final class Mutator {
    /** Byte sequences that are not UTF-8: lone continuation, overlong, surrogate, out of range, truncated. */
    private static final byte[][] BAD_UTF8 = {
            {(byte) 0x80}, {(byte) 0xC0, (byte) 0xAF}, {(byte) 0xED, (byte) 0xA0, (byte) 0x80},
            {(byte) 0xF4, (byte) 0x90, (byte) 0x80, (byte) 0x80}, {(byte) 0xFF}, {(byte) 0xE2, (byte) 0x82}};
    /** Numbers at the edges of double and long, and words some firmware sends instead of numbers. */
    static final String[] ODD_NUMBERS = {"1e999", "-1e999", "1e-999", "9223372036854775808", "-0", "0.0000000000000000001",
            "179769313486231570000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000"
                    + "000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000000"
                    + "00000000000000000000000000000000000000000000000000000000000000000000000000000000000", "NaN", "Infinity", "-inf",
            "0x1F", "1_000", "1,5", "٣", "１２", "1e", "-", ".", "1.", ".5", "+1", "00012", "1e308", "4.9e-324", "2e10", "1.7e11",
            "1e14", "-1e14", "268435455", "268435457", "1e300"};

    private final SplittableRandom random;
    private final List<byte[]> corpus = new ArrayList<>();
    private final String[] tokens;
    private final String open;
    private final String close;

    /**
     * @param tokens fragments of the input's grammar to insert
     * @param open   what opens one level of nesting ("[" for JSON, "- " plus a newline for YAML...)
     * @param close  what closes it (may be empty)
     */
    Mutator(long seed, List<String> corpus, String[] tokens, String open, String close) {
        this.random = new SplittableRandom(seed);
        for (String c : corpus) this.corpus.add(c.getBytes(StandardCharsets.UTF_8));
        this.tokens = tokens;
        this.open = open;
        this.close = close;
    }

    /** One input: a corpus entry with 1 to 4 mutations stacked. */
    byte[] next() {
        byte[] b = corpus.get(random.nextInt(corpus.size()));
        int n = 1 + random.nextInt(4);
        for (int i = 0; i < n; i++) b = mutate(b);
        return b;
    }

    private byte[] mutate(byte[] in) {
        switch (random.nextInt(9)) {
            case 0: return flipBytes(in);
            case 1: return in.length == 0 ? in : java.util.Arrays.copyOf(in, random.nextInt(in.length));
            case 2: return insert(in, tokens[random.nextInt(tokens.length)].getBytes(StandardCharsets.UTF_8));
            case 3: return insert(in, ODD_NUMBERS[random.nextInt(ODD_NUMBERS.length)].getBytes(StandardCharsets.UTF_8));
            case 4: return replaceNumber(in);
            case 5: return insert(in, BAD_UTF8[random.nextInt(BAD_UTF8.length)]);
            case 6: return nest(in);
            case 7: return splice(in, corpus.get(random.nextInt(corpus.size())));
            default: return repeat(in);
        }
    }

    private byte[] flipBytes(byte[] in) {
        if (in.length == 0) return new byte[] {(byte) random.nextInt(256)};
        byte[] out = in.clone();
        int flips = 1 + random.nextInt(3);
        for (int i = 0; i < flips; i++) {
            int at = random.nextInt(out.length);
            out[at] = random.nextBoolean() ? (byte) (out[at] ^ (1 << random.nextInt(8))) : (byte) random.nextInt(256);
        }
        return out;
    }

    private byte[] insert(byte[] in, byte[] what) {
        int at = in.length == 0 ? 0 : random.nextInt(in.length + 1);
        byte[] out = new byte[in.length + what.length];
        System.arraycopy(in, 0, out, 0, at);
        System.arraycopy(what, 0, out, at, what.length);
        System.arraycopy(in, at, out, at + what.length, in.length - at);
        return out;
    }

    /** Swaps the first run of digits after a random point for an odd number. */
    private byte[] replaceNumber(byte[] in) {
        int start = -1;
        int from = in.length == 0 ? 0 : random.nextInt(in.length);
        for (int i = from; i < in.length; i++) {
            if (in[i] >= '0' && in[i] <= '9') {
                start = i;
                break;
            }
        }
        if (start < 0) return insert(in, ODD_NUMBERS[random.nextInt(ODD_NUMBERS.length)].getBytes(StandardCharsets.UTF_8));
        int end = start;
        while (end < in.length && ((in[end] >= '0' && in[end] <= '9') || in[end] == '.')) end++;
        byte[] num = ODD_NUMBERS[random.nextInt(ODD_NUMBERS.length)].getBytes(StandardCharsets.UTF_8);
        byte[] out = new byte[in.length - (end - start) + num.length];
        System.arraycopy(in, 0, out, 0, start);
        System.arraycopy(num, 0, out, start, num.length);
        System.arraycopy(in, end, out, start + num.length, in.length - end);
        return out;
    }

    /** Wraps the input (or nothing) in 1..200 levels of nesting, sometimes unbalanced. */
    private byte[] nest(byte[] in) {
        int depth = 1 + random.nextInt(random.nextBoolean() ? 40 : 200);
        StringBuilder pre = new StringBuilder();
        StringBuilder post = new StringBuilder();
        for (int i = 0; i < depth; i++) {
            pre.append(open.replace("%d", Integer.toString(i)));
            post.append(close);
        }
        byte[] inner = random.nextInt(4) == 0 ? new byte[0] : in;
        byte[] a = pre.toString().getBytes(StandardCharsets.UTF_8);
        byte[] c = random.nextInt(5) == 0 ? new byte[0] : post.toString().getBytes(StandardCharsets.UTF_8);
        byte[] out = new byte[a.length + inner.length + c.length];
        System.arraycopy(a, 0, out, 0, a.length);
        System.arraycopy(inner, 0, out, a.length, inner.length);
        System.arraycopy(c, 0, out, a.length + inner.length, c.length);
        return out;
    }

    private byte[] splice(byte[] a, byte[] b) {
        int cutA = a.length == 0 ? 0 : random.nextInt(a.length);
        int cutB = b.length == 0 ? 0 : random.nextInt(b.length);
        byte[] out = new byte[cutA + b.length - cutB];
        System.arraycopy(a, 0, out, 0, cutA);
        System.arraycopy(b, cutB, out, cutA, b.length - cutB);
        return out;
    }

    /** Repeats a slice several times (long keys, long strings, many records). */
    private byte[] repeat(byte[] in) {
        if (in.length == 0) return in;
        int from = random.nextInt(in.length);
        int len = 1 + random.nextInt(Math.min(64, in.length - from));
        int times = 2 + random.nextInt(random.nextBoolean() ? 8 : 300);
        byte[] slice = java.util.Arrays.copyOfRange(in, from, from + len);
        byte[] rep = new byte[slice.length * times];
        for (int i = 0; i < times; i++) System.arraycopy(slice, 0, rep, i * slice.length, slice.length);
        return insert(in, rep);
    }

    /** Iterations per test: 20,000 by default, {@code -Dbyre.fuzz.iterations=N} to run longer by hand. */
    static int iterations() {
        return Integer.getInteger("byre.fuzz.iterations", 20_000);
    }

    /** The seed: fixed in CI, {@code -Dbyre.fuzz.seed=N} to explore. */
    static long seed(long fixed) {
        return Long.getLong("byre.fuzz.seed", fixed);
    }

    /** Bytes back from {@link #literal}'s text (each char is one byte). */
    static byte[] bytes(String latin1) {
        return latin1.getBytes(StandardCharsets.ISO_8859_1);
    }

    /** The input as Java string literal text, for a failure message that can be pasted into a regression test. */
    static String literal(byte[] b) {
        StringBuilder sb = new StringBuilder("\"");
        for (byte x : b) {
            int c = x & 0xff;
            if (c == '"' || c == '\\') sb.append('\\').append((char) c);
            else if (c >= 0x20 && c < 0x7f) sb.append((char) c);
            else if (c == '\n') sb.append("\\n");
            else sb.append(String.format("\\u00%02x", c));
        }
        return sb.append('"').toString();
    }

    /** "threw X at <first byre frame>": where in byre's own code an escaped exception came from. */
    static String thrown(Throwable e) {
        StringBuilder where = new StringBuilder(e.toString());
        for (StackTraceElement s : e.getStackTrace()) {
            if (s.getClassName().startsWith("byre.")) {
                where.append(" at ").append(s);
                break;
            }
        }
        return "threw " + where;
    }
}
