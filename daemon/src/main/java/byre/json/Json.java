package byre.json;

import com.fasterxml.jackson.core.ErrorReportConfiguration;
import com.fasterxml.jackson.core.JsonFactory;
import com.fasterxml.jackson.core.JsonLocation;
import com.fasterxml.jackson.core.JsonParser;
import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.core.JsonToken;
import com.fasterxml.jackson.core.StreamReadConstraints;
import com.fasterxml.jackson.core.StreamReadFeature;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * Strict JSON reading (RFC 8259) for sensor payloads, SenML records, acknowledgements and byre's own files, on
 * Jackson core's streaming parser (jackson-core only, no data binding). {@link #parse} gives objects as
 * {@code LinkedHashMap} (the last of repeated names wins), arrays as {@code ArrayList}, numbers as {@code Double}
 * (the correctly rounded double of the decimal text, {@code -0} included), plus {@code String}, {@code Boolean} and
 * {@code null}. Every problem is a {@link JsonException} that says what and where.
 */
public final class Json {
    /** Deeper nesting of objects and arrays than this is refused; no payload needs more, and it bounds the stack. */
    public static final int MAX_DEPTH = 32;
    /**
     * Longer numbers are refused. Jackson's default as well, set here so that an upgrade cannot move it: far above
     * any reading (17 significant digits give any double back), and it keeps a hostile number cheap to convert.
     */
    public static final int MAX_NUMBER_CHARS = 1000;
    /** Characters of an offending token quoted in a message (messages go into log lines). */
    private static final int MAX_QUOTED_CHARS = 40;

    private static final JsonFactory FACTORY = JsonFactory.builder()
            .streamReadConstraints(StreamReadConstraints.builder().maxNestingDepth(MAX_DEPTH).maxNumberLength(MAX_NUMBER_CHARS).build())
            .errorReportConfiguration(ErrorReportConfiguration.builder().maxErrorTokenLength(MAX_QUOTED_CHARS).maxRawContentLength(0).build())
            // Jackson's port of a fast decimal reader: as exact as Double.parseDouble (checked by JsonSelectFuzzTest), and quicker.
            .enable(StreamReadFeature.USE_FAST_DOUBLE_PARSER)
            .build();

    private Json() {}

    /** Reads the value whose first token is the parser's current token, leaving the parser on its last token. */
    @FunctionalInterface
    public interface ValueReader<T> {
        T read(JsonParser p) throws IOException;
    }

    /**
     * Reads {@code text}, which must be exactly one JSON value (JSON white space around it allowed), with {@code
     * reader}; throws {@link JsonException} for malformed JSON anywhere in the text, also after what the reader used.
     */
    public static <T> T read(String text, ValueReader<T> reader) {
        try {
            return read(FACTORY.createParser(text), reader);
        } catch (IOException e) {
            throw new UncheckedIOException(e); // a string source does no I/O
        }
    }

    /**
     * As {@link #read(String, ValueReader)}, for UTF-8 text (RFC 8259 section 8.1) straight from bytes, with no
     * string made first: sensor payloads. Jackson would take a byte-order mark or a zero byte among the first four
     * as UTF-16 or UTF-32 instead; such bytes are read as UTF-8 text like any other, which JSON does not allow there.
     */
    public static <T> T read(byte[] utf8, int offset, int length, ValueReader<T> reader) {
        boolean guessable = length >= 3 && utf8[offset] == (byte) 0xEF && utf8[offset + 1] == (byte) 0xBB && utf8[offset + 2] == (byte) 0xBF;
        for (int i = offset; i < offset + Math.min(4, length); i++) guessable |= utf8[i] == 0;
        if (guessable) return read(new String(utf8, offset, length, StandardCharsets.UTF_8), reader);
        try {
            return read(FACTORY.createParser(utf8, offset, length), reader);
        } catch (IOException e) {
            throw new UncheckedIOException(e); // a byte array source does no I/O
        }
    }

    private static <T> T read(JsonParser p, ValueReader<T> reader) throws IOException {
        try (p) {
            try {
                if (p.nextToken() == null) throw new JsonException("no JSON value in the text");
                T result = reader.read(p);
                if (p.nextToken() != null) throw new JsonException("text after the JSON value" + at(p.currentTokenLocation()));
                return result;
            } catch (JsonProcessingException e) { // caught before the parser closes: its location is still where it stopped
                JsonLocation where = e.getLocation() != null ? e.getLocation() : p.currentLocation(); // limits come without one
                throw new JsonException(message(e.getOriginalMessage()) + at(where));
            }
        }
    }

    /** Parses one JSON value; throws {@link JsonException} at the first problem. */
    public static Object parse(String text) {
        return read(text, Json::value);
    }

    /**
     * A reader of the values at the dotted paths, each exactly what {@link #path} finds in
     * {@link #parse}{@code (text)}, without building the rest of the document (only a value found is built); the
     * whole text is still checked. Sensor payloads go through here thousands of times a second in a burst.
     */
    public static ValueReader<Object[]> valuesAt(String... dottedPaths) {
        if (dottedPaths.length > 31) throw new IllegalArgumentException("at most 31 paths at once");
        String[][] steps = new String[dottedPaths.length][];
        for (int i = 0; i < steps.length; i++) steps[i] = steps(dottedPaths[i]);
        return new ValuesAt(steps);
    }

    /** A record, not a lambda: under C1 alone (as byre runs) making a capturing lambda costs about 40 ns a payload. */
    private record ValuesAt(String[][] steps) implements ValueReader<Object[]> {
        @Override
        public Object[] read(JsonParser p) throws IOException {
            Object[] found = new Object[steps.length];
            select(p, steps, 0, (1 << steps.length) - 1, found);
            return found;
        }
    }

    /**
     * Follows a dotted path such as {@code sensor.temp} or {@code readings.0.v} (array index as a
     * number); returns null when any step is missing.
     */
    public static Object path(Object root, String dottedPath) {
        return walk(root, steps(dottedPath), 0);
    }

    private static Object walk(Object node, String[] steps, int from) {
        for (int s = from; s < steps.length && node != null; s++) {
            if (node instanceof Map<?, ?> m) {
                node = m.get(steps[s]);
            } else if (node instanceof List<?> l) {
                int i = arrayIndex(steps[s]);
                node = i >= 0 && i < l.size() ? l.get(i) : null;
            } else {
                return null;
            }
        }
        return node;
    }

    private static String[] steps(String dottedPath) {
        return dottedPath.indexOf('.') < 0 ? new String[] {dottedPath} : dottedPath.split("\\.", -1);
    }

    /** A path step as an array index, or -1. */
    private static int arrayIndex(String step) {
        try {
            return Math.max(-1, Integer.parseInt(step));
        } catch (NumberFormatException e) {
            return -1;
        }
    }

    /**
     * At the first token of a value at {@code depth}: for the paths in {@code mask} that end here, the value; for
     * those that go deeper, descends into the members or elements they name and passes over (still checking) the rest.
     */
    private static void select(JsonParser p, String[][] steps, int depth, int mask, Object[] found) throws IOException {
        boolean endsHere = false;
        for (int i = 0; i < steps.length; i++) if ((mask & (1 << i)) != 0 && steps[i].length == depth) endsHere = true;
        if (endsHere) { // built once; a longer path through the same value is followed in what was built
            Object v = value(p);
            for (int i = 0; i < steps.length; i++) if ((mask & (1 << i)) != 0) found[i] = walk(v, steps[i], depth);
            return;
        }
        JsonToken token = p.currentToken();
        if (token == JsonToken.START_OBJECT) {
            while (p.nextToken() == JsonToken.FIELD_NAME) {
                String name = p.currentName();
                int next = 0;
                for (int i = 0; i < steps.length; i++) {
                    if ((mask & (1 << i)) != 0 && steps[i][depth].equals(name)) {
                        next |= 1 << i;
                        found[i] = null; // a repeated name replaces the earlier member, as in the parsed map
                    }
                }
                p.nextToken();
                if (next == 0) {
                    p.skipChildren();
                } else {
                    select(p, steps, depth + 1, next, found);
                }
            }
        } else if (token == JsonToken.START_ARRAY) {
            int[] wanted = new int[steps.length];
            for (int i = 0; i < steps.length; i++) wanted[i] = (mask & (1 << i)) == 0 ? -1 : arrayIndex(steps[i][depth]);
            for (int index = 0; p.nextToken() != JsonToken.END_ARRAY; index++) {
                int next = 0;
                for (int i = 0; i < steps.length; i++) if (wanted[i] == index) next |= 1 << i;
                if (next == 0) {
                    p.skipChildren();
                } else {
                    select(p, steps, depth + 1, next, found);
                }
            }
        }
        // a scalar where the paths need an object or array: they find nothing here
    }

    /** The value at the parser's current token, built; the parser is left on its last token. */
    public static Object value(JsonParser p) throws IOException {
        switch (p.currentToken()) {
            case START_OBJECT: {
                Map<String, Object> map = new LinkedHashMap<>();
                while (p.nextToken() == JsonToken.FIELD_NAME) {
                    String name = p.currentName();
                    p.nextToken();
                    map.put(name, value(p));
                }
                return map;
            }
            case START_ARRAY: {
                List<Object> list = new ArrayList<>();
                while (p.nextToken() != JsonToken.END_ARRAY) list.add(value(p));
                return list;
            }
            case VALUE_STRING: return p.getText();
            case VALUE_NUMBER_INT: case VALUE_NUMBER_FLOAT: return number(p);
            case VALUE_TRUE: return Boolean.TRUE;
            case VALUE_FALSE: return Boolean.FALSE;
            case VALUE_NULL: return null;
            default: throw new IllegalStateException("not at the start of a value: " + p.currentToken());
        }
    }

    /** The number at the parser's current token as the double {@code Double.parseDouble} gives for its text. */
    private static Double number(JsonParser p) throws IOException {
        double d = p.getDoubleValue();
        // Jackson reads an integer as a long first, which has no negative zero.
        if (d == 0 && p.currentToken() == JsonToken.VALUE_NUMBER_INT && p.getText().charAt(0) == '-') return -0.0;
        return d;
    }

    /** Jackson's message in plain words: where a start marker is, without the source note; no control characters. */
    private static String message(String original) {
        return original.replaceAll("\\[Source: [^;\\]]*; line: (\\d+), column: (\\d+)]", "line $1, column $2")
                .replaceAll(", from `[^`]*`", "")
                .replaceAll("\\p{Cntrl}", "?");
    }

    private static String at(JsonLocation where) {
        return where == null || where.getLineNr() < 1 ? "" : " at line " + where.getLineNr() + ", column " + where.getColumnNr();
    }

    /** Text that is not (exactly one) valid JSON value. */
    public static final class JsonException extends RuntimeException {
        public JsonException(String message) {
            super(message);
        }
    }
}
