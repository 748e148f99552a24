package byre.json;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * A small strict JSON reader (RFC 8259) for sensor payloads, SenML records and acknowledgements.
 * Objects become {@code LinkedHashMap}, arrays {@code ArrayList}, numbers {@code Double}, plus
 * {@code String}, {@code Boolean} and {@code null}. Nesting is bounded so that a hostile payload
 * cannot exhaust the stack. Written by hand: payloads are small and a full JSON library would be
 * most of the jar for three uses.
 */
public final class Json {
    /** Deeper nesting than this is refused; no sensor payload needs more. */
    public static final int MAX_DEPTH = 32;

    /** The text as characters: indexing an array is much cheaper than {@code String.charAt} without the C2 compiler. */
    private final char[] text;
    private int pos;

    private Json(String text) {
        this.text = text.toCharArray();
    }

    /** Parses one JSON value; throws {@link JsonException} with the offset of the first problem. */
    public static Object parse(String text) {
        Json p = new Json(text);
        p.skipWhitespace();
        Object value = p.value(0);
        p.skipWhitespace();
        if (p.pos != text.length()) throw p.error("unexpected text after the value");
        return value;
    }

    /**
     * Follows a dotted path such as {@code sensor.temp} or {@code readings.0.v} (array index as a
     * number); returns null when any step is missing.
     */
    public static Object path(Object root, String dottedPath) {
        Object node = root;
        for (String step : dottedPath.split("\\.", -1)) {
            if (node instanceof Map<?, ?> m) {
                node = m.get(step);
            } else if (node instanceof List<?> l) {
                int i;
                try {
                    i = Integer.parseInt(step);
                } catch (NumberFormatException e) {
                    return null;
                }
                node = i >= 0 && i < l.size() ? l.get(i) : null;
            } else {
                return null;
            }
            if (node == null) return null;
        }
        return node;
    }

    /**
     * The values of the given top-level members of a JSON object, as {@link #path} would find them after
     * {@link #parse} (the last of repeated names wins), without building the rest of the document: the
     * whole text is still checked, and a malformed one throws like {@link #parse}. Returns null, without
     * reading further, when the text does not start with an object: the caller reads it with {@link #parse}.
     * Sensor payloads go through here thousands of times a second in a burst.
     */
    public static Object[] members(String text, String... names) {
        Json p = new Json(text);
        p.skipWhitespace();
        if (p.pos >= text.length() || text.charAt(p.pos) != '{') return null;
        Object[] found = new Object[names.length];
        try {
            p.selectMembers(names, found);
            p.skipWhitespace();
            if (p.pos != text.length()) throw p.error("unexpected text after the value");
        } catch (JsonException e) {
            parse(text); // the error exactly as parse reports it
            throw e;
        }
        return found;
    }

    private void selectMembers(String[] names, Object[] found) {
        pos++;
        skipWhitespace();
        if (peek() == '}') {
            pos++;
            return;
        }
        while (true) {
            skipWhitespace();
            if (peek() != '"') throw error("expected a quoted member name");
            int wanted = memberIndex(names);
            skipWhitespace();
            if (peek() != ':') throw error("expected ':' after member name");
            pos++;
            skipWhitespace();
            if (wanted >= 0) {
                found[wanted] = value(1);
            } else {
                skipValue(1);
            }
            skipWhitespace();
            char c = peek();
            pos++;
            if (c == '}') return;
            if (c != ',') throw error("expected ',' or '}' in object");
        }
    }

    /** Reads a member name; its index in {@code names}, or -1. */
    private int memberIndex(String[] names) {
        int start = pos + 1;
        int end = start;
        while (end < text.length && text[end] != '"' && text[end] != '\\' && text[end] >= 0x20) end++;
        if (end < text.length && text[end] == '"') {
            pos = end + 1; // a plain name: compared in place
            for (int i = 0; i < names.length; i++) {
                if (names[i].length() == end - start && regionIs(names[i], start)) return i;
            }
            return -1;
        }
        String key = string(); // escapes (or a malformed name, which throws here)
        for (int i = 0; i < names.length; i++) if (names[i].equals(key)) return i;
        return -1;
    }

    /** Checks and passes over one value without building it (same rules and messages as {@link #value}). */
    private void skipValue(int depth) {
        if (depth > MAX_DEPTH) throw error("nesting deeper than " + MAX_DEPTH);
        if (pos >= text.length) throw error("unexpected end of input");
        char c = text[pos];
        switch (c) {
            case '{': skipContainer(depth, '}', true); return;
            case '[': skipContainer(depth, ']', false); return;
            case '"': scanString(null); return;
            case 't': literal("true", null); return;
            case 'f': literal("false", null); return;
            case 'n': literal("null", null); return;
            default:
                if (c == '-' || (c >= '0' && c <= '9')) {
                    numberEnd();
                    return;
                }
                throw error("unexpected character '" + printable(c) + "'");
        }
    }

    private void skipContainer(int depth, char close, boolean object) {
        pos++;
        skipWhitespace();
        if (peek() == close) {
            pos++;
            return;
        }
        while (true) {
            skipWhitespace();
            if (object) {
                if (peek() != '"') throw error("expected a quoted member name");
                scanString(null);
                skipWhitespace();
                if (peek() != ':') throw error("expected ':' after member name");
                pos++;
                skipWhitespace();
            }
            skipValue(depth + 1);
            skipWhitespace();
            char c = peek();
            pos++;
            if (c == close) return;
            if (c != ',') throw error(object ? "expected ',' or '}' in object" : "expected ',' or ']' in array");
        }
    }

    private Object value(int depth) {
        if (depth > MAX_DEPTH) throw error("nesting deeper than " + MAX_DEPTH);
        if (pos >= text.length) throw error("unexpected end of input");
        char c = text[pos];
        switch (c) {
            case '{': return object(depth);
            case '[': return array(depth);
            case '"': return string();
            case 't': return literal("true", Boolean.TRUE);
            case 'f': return literal("false", Boolean.FALSE);
            case 'n': return literal("null", null);
            default:
                if (c == '-' || (c >= '0' && c <= '9')) return number();
                throw error("unexpected character '" + printable(c) + "'");
        }
    }

    private Map<String, Object> object(int depth) {
        Map<String, Object> map = new LinkedHashMap<>();
        pos++;
        skipWhitespace();
        if (peek() == '}') {
            pos++;
            return map;
        }
        while (true) {
            skipWhitespace();
            if (peek() != '"') throw error("expected a quoted member name");
            String key = string();
            skipWhitespace();
            if (peek() != ':') throw error("expected ':' after member name");
            pos++;
            skipWhitespace();
            map.put(key, value(depth + 1));
            skipWhitespace();
            char c = peek();
            pos++;
            if (c == '}') return map;
            if (c != ',') throw error("expected ',' or '}' in object");
        }
    }

    private List<Object> array(int depth) {
        List<Object> list = new ArrayList<>();
        pos++;
        skipWhitespace();
        if (peek() == ']') {
            pos++;
            return list;
        }
        while (true) {
            skipWhitespace();
            list.add(value(depth + 1));
            skipWhitespace();
            char c = peek();
            pos++;
            if (c == ']') return list;
            if (c != ',') throw error("expected ',' or ']' in array");
        }
    }

    private String string() {
        StringBuilder sb = new StringBuilder();
        scanString(sb);
        return sb.toString();
    }

    /** Moves past one string, checking it; appends its characters to {@code out} unless that is null. */
    private void scanString(StringBuilder out) {
        pos++;
        while (true) {
            if (pos >= text.length) throw error("unterminated string");
            char c = text[pos++];
            if (c == '"') return;
            if (c < 0x20) throw error("control character in string");
            if (c == '\\') c = escape();
            if (out != null) out.append(c);
        }
    }

    /** The character of the escape after a backslash. */
    private char escape() {
        if (pos >= text.length) throw error("unterminated escape");
        char e = text[pos++];
        switch (e) {
            case '"': case '\\': case '/': return e;
            case 'b': return '\b';
            case 'f': return '\f';
            case 'n': return '\n';
            case 'r': return '\r';
            case 't': return '\t';
            case 'u':
                if (pos + 4 > text.length) throw error("short \\u escape");
                char unit;
                try {
                    unit = (char) Integer.parseInt(new String(text, pos, 4), 16);
                } catch (NumberFormatException ex) {
                    throw error("bad \\u escape");
                }
                pos += 4;
                return unit;
            default: throw error("bad escape '\\" + printable(e) + "'");
        }
    }

    private Double number() {
        int start = pos;
        numberEnd();
        double quick = exactDecimal(text, start, pos);
        return Double.isNaN(quick) ? Double.parseDouble(new String(text, start, pos - start)) : quick;
    }

    private static final double[] POWERS_OF_TEN = {1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12,
        1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22};

    /**
     * The value of a well-formed JSON number when it has at most 15 significant digits and a decimal exponent
     * within ±22, else NaN. Such a mantissa and power of ten are both exact doubles, so one multiplication or
     * division rounds correctly and gives what {@code Double.parseDouble} gives (Clinger, "How to read floating
     * point numbers accurately", PLDI 1990). Sensor readings nearly always take this path.
     */
    static double exactDecimal(char[] t, int from, int to) {
        int i = from;
        boolean negative = t[i] == '-';
        if (negative) i++;
        long mantissa = 0;
        int digits = 0;
        int scale = 0;
        boolean fraction = false;
        for (; i < to; i++) {
            char c = t[i];
            if (c == '.') {
                fraction = true;
                continue;
            }
            if (c < '0' || c > '9') break;
            if (mantissa != 0 || c != '0') {
                if (++digits > 15) return Double.NaN;
                mantissa = mantissa * 10 + (c - '0');
            }
            if (fraction) scale--;
        }
        if (i < to) { // exponent
            i++;
            boolean expNegative = t[i] == '-';
            if (t[i] == '+' || t[i] == '-') i++;
            int exp = 0;
            for (; i < to; i++) {
                exp = exp * 10 + (t[i] - '0');
                if (exp > 1000) return Double.NaN;
            }
            scale += expNegative ? -exp : exp;
        }
        if (scale < -22 || scale > 22) return mantissa == 0 ? (negative ? -0.0 : 0.0) : Double.NaN;
        double v = scale >= 0 ? mantissa * POWERS_OF_TEN[scale] : mantissa / POWERS_OF_TEN[-scale];
        return negative ? -v : v;
    }

    /** Moves past one number (RFC 8259 grammar). */
    private void numberEnd() {
        if (peek() == '-') pos++;
        if (!digit()) throw error("malformed number");
        if (text[pos] == '0') {
            pos++;
        } else {
            while (digit()) pos++;
        }
        if (pos < text.length && text[pos] == '.') {
            pos++;
            if (!digit()) throw error("malformed number");
            while (digit()) pos++;
        }
        if (pos < text.length && (text[pos] == 'e' || text[pos] == 'E')) {
            pos++;
            if (pos < text.length && (text[pos] == '+' || text[pos] == '-')) pos++;
            if (!digit()) throw error("malformed number");
            while (digit()) pos++;
        }
    }

    private boolean digit() {
        return pos < text.length && text[pos] >= '0' && text[pos] <= '9';
    }

    private Object literal(String word, Object value) {
        if (!regionIs(word, pos)) throw error("unexpected word");
        pos += word.length();
        return value;
    }

    /** Whether {@code word} appears at {@code at}. */
    private boolean regionIs(String word, int at) {
        if (at < 0 || at + word.length() > text.length) return false;
        for (int i = 0; i < word.length(); i++) if (text[at + i] != word.charAt(i)) return false;
        return true;
    }

    private char peek() {
        if (pos >= text.length) throw error("unexpected end of input");
        return text[pos];
    }

    private void skipWhitespace() {
        while (pos < text.length) {
            char c = text[pos];
            if (c != ' ' && c != '\t' && c != '\n' && c != '\r') return;
            pos++;
        }
    }

    private JsonException error(String message) {
        return new JsonException(message + " at offset " + pos);
    }

    private static String printable(char c) {
        return c < 0x20 || c > 0x7e ? String.format("\\u%04x", (int) c) : String.valueOf(c);
    }

    /** A payload that is not valid JSON. */
    public static final class JsonException extends RuntimeException {
        public JsonException(String message) {
            super(message);
        }
    }
}
