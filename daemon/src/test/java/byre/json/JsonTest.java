package byre.json;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/** The reading rules byre relies on: types, strictness, limits, and messages that say what and where. */
class JsonTest {
    static String error(String text) {
        return assertThrows(Json.JsonException.class, () -> Json.parse(text), text).getMessage();
    }

    @Test
    void buildsMapsListsDoublesStringsBooleansAndNull() {
        Object root = Json.parse(" {\"b\": [1, 2.5, \"x\\u00e9\", true, false, null], \"a\": {\"c\": -0}, \"b\": [3]}\n");
        assertTrue(root instanceof LinkedHashMap<?, ?>);
        assertEquals(List.of("b", "a"), new ArrayList<>(((Map<?, ?>) root).keySet()), "document order; a repeated name keeps its place");
        assertEquals(List.of(3.0), Json.path(root, "b"), "the last of repeated names");
        assertEquals(-0.0, Json.path(root, "a.c"), "-0 is negative zero, as Double.parseDouble reads it");
        assertEquals(Arrays.asList(1.0, 2.5, "xé", true, false, null), Json.parse("[1, 2.5, \"x\\u00e9\", true, false, null]"));
        assertEquals(3.0, Json.path(Json.parse("{\"r\":[{\"v\":3}]}"), "r.0.v"));
        assertNull(Json.path(Json.parse("{\"r\":[{\"v\":3}]}"), "r.1.v"));
        assertNull(Json.path(Json.parse("{\"r\":[{\"v\":3}]}"), "r.v"));
    }

    @Test
    void refusesWhatRfc8259DoesNotAllow() {
        for (String bad : List.of("{\"v\":1,}", "[1,]", "{\"v\":01}", "{'v':1}", "{\"v\":1 /* c */}", "{\"v\":NaN}", "{\"v\":Infinity}",
                "{\"v\":.5}", "{\"v\":\"a\tb\"}", "{\"v\":\"\\x\"}", "{v:1}", "{\"v\":1}{\"v\":2}", "{\"v\":1} 2", "", "  ",
                "\f{\"v\":1}", "\uFEFF{\"v\":1}")) {
            error(bad);
        }
    }

    @Test
    void messagesSayWhatAndWhere() {
        assertEquals("Unexpected character ('}' (code 125)): was expecting double-quote to start field name at line 1, column 8",
                error("{\"v\":1,}"));
        assertEquals("text after the JSON value at line 2, column 1", error("{\"v\":1}\n{}"));
        assertEquals("no JSON value in the text", error(" "));
        String unclosed = error("{\"a\":\n[1,2");
        assertTrue(unclosed.contains("start marker at line 2, column 1") && unclosed.endsWith("at line 2, column 5"), unclosed);
        assertFalse(unclosed.contains("Source"), unclosed);
        String control = error("{\"id\":xyz\u0001\u0002" + "q".repeat(100) + "}");
        assertTrue(control.chars().noneMatch(Character::isISOControl), "no control characters for the log: " + control);
        assertTrue(control.length() < 200, "an offending token is quoted in part: " + control);
    }

    @Test
    void nestingIsLimitedTo32Levels() {
        Json.parse("[".repeat(Json.MAX_DEPTH) + "]".repeat(Json.MAX_DEPTH));
        String deep = error("{\"x\":" + "[".repeat(Json.MAX_DEPTH) + "]".repeat(Json.MAX_DEPTH) + "}");
        assertTrue(deep.startsWith("Document nesting depth (33) exceeds the maximum allowed (32)") && deep.endsWith("at line 1, column 38"), deep);
        // A member that is passed over counts too.
        assertThrows(Json.JsonException.class, () -> Json.read("{\"x\":" + "[".repeat(40) + "]".repeat(40) + ",\"v\":1}", Json.valuesAt("v")));
    }

    @Test
    void numbersAreLimitedTo1000Characters() {
        String longest = "1" + "0".repeat(Json.MAX_NUMBER_CHARS - 1);
        assertEquals(Double.POSITIVE_INFINITY, Json.parse(longest), "read, and not finite: the caller refuses it");
        String tooLong = error("{\"v\":" + longest + "0}");
        assertTrue(tooLong.startsWith("Number value length (1001) exceeds the maximum allowed (1000)"), tooLong);
        assertThrows(Json.JsonException.class, () -> Json.read("{\"x\":" + longest + "0,\"v\":1}", Json.valuesAt("v")), "also in a member passed over");
    }
}
