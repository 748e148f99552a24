package byre.fuzz;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.fail;

import byre.json.Json;
import java.nio.charset.StandardCharsets;
import java.util.List;
import java.util.Objects;
import org.junit.jupiter.api.Test;

/**
 * {@link Json#members} (the payload fast path) against the full reader: for every input, the same values as
 * {@link Json#parse} followed by {@link Json#path}, or the same error message. Worked examples first, then
 * 20,000 mutated payloads.
 */
class JsonMembersFuzzTest {
    static final String[] NAMES = {"v", "ts"};
    static final List<String> CORPUS = List.of(
            "{\"v\":21.37,\"ts\":1784036100123}",
            "{\"ts\": \"2026-07-14T13:35:00Z\", \"v\": \"19.5\", \"id\": \"pen1\\u0041\", \"n\": [1, {\"v\": 3}], \"ok\": false}",
            "{\"\\u0076\":1.5,\"v\":2.5,\"x\":{\"ts\":9,\"deep\":[[[]]]},\"s\":\"a\\\"b\\\\c\\/\\n\"}",
            "{\"v\":null,\"ts\":true,\"e\":{}, \"a\":[]}",
            "[{\"v\":1}]");

    /** What parse + path give: the values, or the error message. */
    static Object slow(String text) {
        try {
            Object root = Json.parse(text);
            if (!(root instanceof java.util.Map)) return "not an object";
            return new Object[] {Json.path(root, NAMES[0]), Json.path(root, NAMES[1])};
        } catch (Json.JsonException e) {
            return "error: " + e.getMessage();
        }
    }

    /** members, or the full reader where members declines (only a text that does not start with an object). */
    static Object fast(String text) {
        try {
            Object[] found = Json.members(text, NAMES);
            if (found == null) return startsWithObject(text) ? "members declined an object" : slow(text);
            return found;
        } catch (Json.JsonException e) {
            return "error: " + e.getMessage();
        }
    }

    /** Whether the first character after JSON whitespace (RFC 8259: space, tab, LF, CR) opens an object. */
    static boolean startsWithObject(String text) {
        int i = 0;
        while (i < text.length() && " \t\n\r".indexOf(text.charAt(i)) >= 0) i++;
        return i < text.length() && text.charAt(i) == '{';
    }

    static boolean same(Object a, Object b) {
        if (a instanceof Object[] x && b instanceof Object[] y) return java.util.Arrays.equals(x, y);
        return Objects.equals(a, b);
    }

    @Test
    void picksTopLevelMembersLikeTheFullReader() {
        assertArrayEquals(new Object[] {21.37, 1.784036100123e12}, Json.members(CORPUS.get(0), NAMES));
        assertArrayEquals(new Object[] {"19.5", "2026-07-14T13:35:00Z"}, Json.members(CORPUS.get(1), NAMES));
        // A repeated name: the last one wins, as in the parsed map; an escaped name is the same name.
        assertArrayEquals(new Object[] {2.5, null}, Json.members(CORPUS.get(2), NAMES));
        assertArrayEquals(new Object[] {null, true}, Json.members(CORPUS.get(3), NAMES));
        assertNull(Json.members(CORPUS.get(4), NAMES), "an array is not an object");
        for (String c : CORPUS) assertTrue(same(slow(c), fast(c)), c);
    }

    @Test
    void reportsTheSameErrorsAsTheFullReader() {
        for (String bad : List.of("{\"v\":1,}", "{\"v\":01}", "{\"x\":[1,2}", "{\"x\":\"\\q\"}", "{\"v\":1} x", "{\"x\":tru}", "{",
                "{\"v\"", "{\"x\":" + "[".repeat(40) + "]".repeat(40) + "}")) {
            Json.JsonException full = assertThrows(Json.JsonException.class, () -> Json.parse(bad), bad);
            Json.JsonException quick = assertThrows(Json.JsonException.class, () -> Json.members(bad, NAMES), bad);
            assertEquals(full.getMessage(), quick.getMessage(), bad);
        }
    }

    @Test
    void mutatedPayloadsGiveWhatTheFullReaderGives() {
        Mutator m = new Mutator(Mutator.seed(20261202L), CORPUS, PayloadDecoderFuzzTest.JSON_TOKENS, "[", "]");
        for (int i = 0; i < Mutator.iterations(); i++) {
            String text = new String(m.next(), StandardCharsets.ISO_8859_1);
            Object slow = slow(text);
            Object fast;
            try {
                fast = fast(text);
            } catch (RuntimeException | StackOverflowError e) {
                fail("input " + i + " " + Mutator.literal(text.getBytes(StandardCharsets.ISO_8859_1)) + ": members threw " + e);
                return;
            }
            if (!same(slow, fast)) {
                fail("input " + i + " " + Mutator.literal(text.getBytes(StandardCharsets.ISO_8859_1)) + ": full reader "
                        + describe(slow) + ", members " + describe(fast));
            }
        }
    }

    @Test
    void numbersReadExactlyAsJavaReadsThem() {
        // The reader's quick path for short decimals must give the correctly rounded double, bit for bit.
        java.util.SplittableRandom r = new java.util.SplittableRandom(Mutator.seed(424242L));
        List<String> fixed = List.of("0", "-0", "-0.0", "21.37", "0.1", "0.3", "1784036100123", "9007199254740993", "123456789012345",
                "1234567890123456", "0.000000000000000000000001", "1e22", "1e23", "-4.9e-324", "2.2250738585072014e-308", "1.7976931348623157e308",
                "0e999", "5e-324", "999999999999999e22", "0.000123", "100.000");
        for (String n : fixed) assertEquals(Double.valueOf(Double.parseDouble(n)), Json.parse(n), n);
        for (int i = 0; i < Mutator.iterations(); i++) {
            StringBuilder sb = new StringBuilder();
            if (r.nextBoolean()) sb.append('-');
            int whole = 1 + r.nextInt(r.nextBoolean() ? 4 : 18);
            sb.append(1 + r.nextInt(9));
            for (int d = 1; d < whole; d++) sb.append(r.nextInt(10));
            if (r.nextBoolean()) {
                sb.append('.');
                int frac = 1 + r.nextInt(r.nextBoolean() ? 4 : 18);
                for (int d = 0; d < frac; d++) sb.append(r.nextInt(10));
            }
            if (r.nextInt(4) == 0) sb.append(r.nextBoolean() ? 'e' : 'E').append(r.nextBoolean() ? "-" : "").append(r.nextInt(40));
            String n = sb.toString();
            assertEquals(Double.valueOf(Double.parseDouble(n)), Json.parse(n), "input " + i + ": " + n);
        }
    }

    static String describe(Object o) {
        return o instanceof Object[] a ? java.util.Arrays.toString(a) : String.valueOf(o);
    }

    private static void assertTrue(boolean b, String message) {
        org.junit.jupiter.api.Assertions.assertTrue(b, message);
    }
}
