package byre.fuzz;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

import byre.json.Json;
import java.nio.charset.StandardCharsets;
import java.util.Arrays;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import org.junit.jupiter.api.Test;

/**
 * {@link Json#valuesAt} (the payload path: picks values while passing over the rest of the document), from text and
 * from ASCII bytes, against the full reader: for every input, the same values as {@link Json#parse} followed by
 * {@link Json#path}, or the same error message. Worked examples first, then 20,000 mutated payloads for top-level
 * names and for dotted paths.
 */
class JsonSelectFuzzTest {
    static final String[] TOP = {"v", "ts"};
    static final String[] DOTTED = {"sensor.speed", "readings.0.at", "x.deep.1"};
    static final List<String> CORPUS = List.of(
            "{\"v\":21.37,\"ts\":1784036100123}",
            "{\"ts\": \"2026-07-14T13:35:00Z\", \"v\": \"19.5\", \"id\": \"pen1\\u0041\", \"n\": [1, {\"v\": 3}], \"ok\": false}",
            "{\"\\u0076\":1.5,\"v\":2.5,\"x\":{\"ts\":9,\"deep\":[[[]], {\"a\": null}]},\"s\":\"a\\\"b\\\\c\\/\\n\"}",
            "{\"v\":null,\"ts\":true,\"e\":{}, \"a\":[]}",
            "{\"sensor\":{\"speed\":1.2,\"id\":\"fan2\"},\"readings\":[{\"v\":0.4,\"at\":\"2026-07-14T13:35:00+01:00\"}],\"sensor\":{\"speed\":-0}}",
            "[{\"v\":1}]");

    /** What parse + path give: the values, or the error message. */
    static Object full(String text, String[] paths) {
        try {
            Object root = Json.parse(text);
            return Arrays.stream(paths).map(p -> Json.path(root, p)).toArray();
        } catch (Json.JsonException e) {
            return "error: " + e.getMessage();
        }
    }

    /**
     * What valuesAt gives from the text; and from its bytes when they are ASCII (as a payload's are read), where
     * Jackson's byte parser must find the same values or fail too (its messages are worded, and its columns counted,
     * a little differently).
     */
    static Object selected(String text, String[] paths) {
        Object fromText = selectedOrError(() -> Json.read(text, Json.valuesAt(paths)));
        if (!text.chars().allMatch(c -> c < 0x80)) return fromText;
        byte[] ascii = text.getBytes(StandardCharsets.US_ASCII);
        Object fromBytes = selectedOrError(() -> Json.read(ascii, 0, ascii.length, Json.valuesAt(paths)));
        // The one known difference: the byte parser refuses a member name with a lone surrogate escape ("\\ud800"),
        // which it would have to encode as UTF-8; the text parser keeps it as a char (JSON's grammar allows both).
        boolean loneSurrogateName = fromBytes instanceof String e && e.contains("surrogate pair in field name");
        return same(verdict(fromText), verdict(fromBytes)) || loneSurrogateName ? fromText
                : "from text " + describe(fromText) + ", from bytes " + describe(fromBytes);
    }

    static Object verdict(Object result) {
        return result instanceof String ? "error" : result;
    }

    static Object selectedOrError(java.util.function.Supplier<Object[]> read) {
        try {
            return read.get();
        } catch (Json.JsonException e) {
            return "error: " + e.getMessage();
        }
    }

    static Object[] select(String text, String... paths) {
        return Json.read(text, Json.valuesAt(paths));
    }

    /** Equal values, telling -0.0 from 0.0 (Double.equals does). */
    static boolean same(Object a, Object b) {
        if (a instanceof Object[] x && b instanceof Object[] y) return Arrays.equals(x, y);
        return Objects.equals(a, b);
    }

    @Test
    void picksValuesLikeTheFullReader() {
        assertArrayEquals(new Object[] {21.37, 1.784036100123e12}, select(CORPUS.get(0), TOP));
        assertArrayEquals(new Object[] {"19.5", "2026-07-14T13:35:00Z"}, select(CORPUS.get(1), TOP));
        // A repeated name: the last one wins, as in the parsed map; an escaped name is the same name.
        assertArrayEquals(new Object[] {2.5, null}, select(CORPUS.get(2), TOP));
        assertArrayEquals(new Object[] {null, true}, select(CORPUS.get(3), TOP));
        assertArrayEquals(new Object[] {null, null}, select(CORPUS.get(5), TOP), "an array has no named members");
        // The later "sensor" replaces the earlier one as a whole; -0 stays negative zero.
        assertArrayEquals(new Object[] {-0.0, "2026-07-14T13:35:00+01:00", null}, select(CORPUS.get(4), DOTTED));
        assertArrayEquals(new Object[] {null, null, Map.of("a", Map.of())},
                select("{\"x\":{\"deep\":[0,{\"a\":{}}]}}", DOTTED), "a value that is an object is built");
        assertArrayEquals(new Object[] {Map.of("b", 1.0), 1.0, null}, select("{\"a\":{\"b\":1}}", "a", "a.b", "a.b.c"),
                "a path through a value another path ends at");
        assertArrayEquals(new Object[] {null}, select("{\"a\":{\"b\":1},\"a\":{\"c\":2}}", "a.b"));
        assertArrayEquals(new Object[] {2.0, null, null}, select("[1,2]", "1", "-1", "x"));
        for (String c : CORPUS) {
            assertTrue(same(full(c, TOP), selected(c, TOP)), c);
            assertTrue(same(full(c, DOTTED), selected(c, DOTTED)), c);
        }
    }

    @Test
    void reportsTheSameErrorsAsTheFullReader() {
        for (String bad : List.of("{\"v\":1,}", "{\"v\":01}", "{\"x\":[1,2}", "{\"x\":\"\\q\"}", "{\"v\":1} x", "{\"v\":1}{}", "{\"x\":tru}",
                "{", "{\"v\"", "", " ", "{\"x\":" + "[".repeat(40) + "]".repeat(40) + "}", "{\"x\":1" + "0".repeat(1000) + "}",
                "{\"x\":\"a\u0001b\"}", "{\"x\":NaN}", "\u0000{}", "{\u0000}", "\"\u0000\"")) {
            Json.JsonException full = assertThrows(Json.JsonException.class, () -> Json.parse(bad), bad);
            assertEquals("error: " + full.getMessage(), selected(bad, TOP), bad);
        }
    }

    @Test
    void mutatedPayloadsGiveWhatTheFullReaderGives() {
        Mutator m = new Mutator(Mutator.seed(20261202L), CORPUS, PayloadDecoderFuzzTest.JSON_TOKENS, "[", "]");
        int values = 0;
        for (int i = 0; i < Mutator.iterations(); i++) {
            String text = new String(m.next(), StandardCharsets.ISO_8859_1);
            for (String[] paths : List.of(TOP, DOTTED)) {
                Object full = full(text, paths);
                Object selected;
                try {
                    selected = selected(text, paths);
                } catch (RuntimeException | StackOverflowError e) {
                    fail("input " + i + " " + Mutator.literal(text.getBytes(StandardCharsets.ISO_8859_1)) + ": select threw " + e);
                    return;
                }
                if (!same(full, selected)) {
                    fail("input " + i + " " + Mutator.literal(text.getBytes(StandardCharsets.ISO_8859_1)) + " " + Arrays.toString(paths)
                            + ": full reader " + describe(full) + ", select " + describe(selected));
                }
                if (full instanceof Object[] found && Arrays.stream(found).anyMatch(Objects::nonNull)) values++;
            }
        }
        // Mutations that break every input would compare error messages only (at the default 20,000: 1,345 of 40,000).
        assertTrue(values > Mutator.iterations() / 50, "too few mutated inputs still had values: " + values);
    }

    @Test
    void numbersReadExactlyAsJavaReadsThem() {
        // Double.parseDouble is the reference: the parser's number reading must give the correctly rounded double, bit for bit.
        java.util.SplittableRandom r = new java.util.SplittableRandom(Mutator.seed(424242L));
        List<String> fixed = List.of("0", "-0", "-0.0", "-0e5", "21.37", "0.1", "0.3", "1784036100123", "9007199254740993", "123456789012345",
                "1234567890123456", "0.000000000000000000000001", "1e22", "1e23", "-4.9e-324", "2.2250738585072014e-308", "1.7976931348623157e308",
                "0e999", "5e-324", "999999999999999e22", "0.000123", "100.000", "9223372036854775807", "9223372036854775808",
                "-9223372036854775809", "123456789012345678901234567890", "1e400", "-1e400");
        for (String n : fixed) assertEquals(Double.valueOf(Double.parseDouble(n)), Json.parse(n), n);
        for (int i = 0; i < Mutator.iterations(); i++) {
            StringBuilder sb = new StringBuilder();
            if (r.nextBoolean()) sb.append('-');
            int whole = 1 + r.nextInt(r.nextBoolean() ? 4 : r.nextInt(8) == 0 ? 30 : 18);
            sb.append(1 + r.nextInt(9));
            for (int d = 1; d < whole; d++) sb.append(r.nextInt(10));
            if (r.nextBoolean()) {
                sb.append('.');
                int frac = 1 + r.nextInt(r.nextBoolean() ? 4 : 18);
                for (int d = 0; d < frac; d++) sb.append(r.nextInt(10));
            }
            if (r.nextInt(4) == 0) sb.append(r.nextBoolean() ? 'e' : 'E').append(r.nextBoolean() ? "-" : "").append(r.nextInt(340));
            String n = sb.toString();
            assertEquals(Double.valueOf(Double.parseDouble(n)), Json.parse(n), "input " + i + ": " + n);
        }
    }

    static String describe(Object o) {
        return o instanceof Object[] a ? Arrays.toString(a) : String.valueOf(o);
    }
}
