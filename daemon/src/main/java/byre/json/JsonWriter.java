package byre.json;

import java.util.Collection;

/**
 * Writes JSON text in the order it is given: an object ({@code new JsonWriter()}) or an array
 * ({@link #array()}) at the top, with nested objects and arrays opened by {@code begin…} and closed by
 * {@link #end()}. Members of an object are written with {@code field}, items of an array with {@code value}.
 * Numbers are written so that {@code Double.parseDouble} gives back the same double; NaN and the
 * infinities, which JSON has no words for, are written as null.
 */
public final class JsonWriter {
    private final StringBuilder sb = new StringBuilder(128);
    /** Open containers, innermost last: true for an array. */
    private boolean[] arrays = new boolean[4];
    /** Whether the container at the same depth has no member yet. */
    private boolean[] empty = new boolean[4];
    private int depth;

    /** A writer of one JSON object. */
    public JsonWriter() {
        open('{', false);
    }

    private JsonWriter(boolean array) {
        open(array ? '[' : '{', array);
    }

    /** A writer of one JSON array. */
    public static JsonWriter array() {
        return new JsonWriter(true);
    }

    // ---- members of an object ----

    public JsonWriter field(String name, String value) {
        key(name);
        string(value);
        return this;
    }

    /** A number; NaN and infinities become null (JSON has no such numbers). */
    public JsonWriter field(String name, double value) {
        key(name);
        sb.append(number(value));
        return this;
    }

    public JsonWriter field(String name, long value) {
        key(name);
        sb.append(value);
        return this;
    }

    public JsonWriter field(String name, boolean value) {
        key(name);
        sb.append(value);
        return this;
    }

    /** An array of strings (a null item is written as null). */
    public JsonWriter field(String name, Collection<String> values) {
        beginArray(name);
        for (String v : values) value(v);
        return end();
    }

    /** Inserts JSON text that another {@code JsonWriter} made. */
    public JsonWriter raw(String name, String json) {
        key(name);
        sb.append(json);
        return this;
    }

    public JsonWriter beginObject(String name) {
        key(name);
        return open('{', false);
    }

    public JsonWriter beginArray(String name) {
        key(name);
        return open('[', true);
    }

    // ---- items of an array ----

    public JsonWriter value(String value) {
        item();
        string(value);
        return this;
    }

    /** A number; NaN and infinities become null. */
    public JsonWriter value(double value) {
        item();
        sb.append(number(value));
        return this;
    }

    public JsonWriter value(long value) {
        item();
        sb.append(value);
        return this;
    }

    public JsonWriter beginObject() {
        item();
        return open('{', false);
    }

    public JsonWriter beginArray() {
        item();
        return open('[', true);
    }

    /** Closes the innermost object or array opened by a {@code begin…} call. */
    public JsonWriter end() {
        if (depth <= 1) throw new IllegalStateException("nothing opened to end");
        depth--;
        sb.append(arrays[depth] ? ']' : '}');
        return this;
    }

    /** The text, with the top-level object or array closed; every nested one must have been ended. */
    @Override
    public String toString() {
        if (depth != 1) throw new IllegalStateException((depth - 1) + " nested object(s) or array(s) not ended");
        return sb + (arrays[0] ? "]" : "}");
    }

    private JsonWriter open(char c, boolean array) {
        if (depth == arrays.length) {
            arrays = java.util.Arrays.copyOf(arrays, depth * 2);
            empty = java.util.Arrays.copyOf(empty, depth * 2);
        }
        arrays[depth] = array;
        empty[depth] = true;
        depth++;
        sb.append(c);
        return this;
    }

    private void key(String name) {
        if (arrays[depth - 1]) throw new IllegalStateException("a field '" + name + "' inside an array; use value()");
        comma();
        quote(sb, name);
        sb.append(':');
    }

    private void item() {
        if (!arrays[depth - 1]) throw new IllegalStateException("a value inside an object; use field()");
        comma();
    }

    private void comma() {
        if (!empty[depth - 1]) sb.append(',');
        empty[depth - 1] = false;
    }

    private void string(String value) {
        if (value == null) {
            sb.append("null");
        } else {
            quote(sb, value);
        }
    }

    /** The JSON text of a number: {@link #format} for finite values, null for NaN and the infinities. */
    public static String number(double v) {
        return Double.isFinite(v) ? format(v) : "null";
    }

    /**
     * The decimal text of a finite double that reads back as the same double: whole numbers below 10^15
     * without a fraction ({@code 72}, {@code -0}), everything else as {@code Double.toString} writes it
     * ({@code 72.5}, {@code 1.0E20}, {@code 4.9E-324}), which the JDK specifies to round-trip and which is
     * valid JSON. Not for NaN or infinities (see {@link #number}).
     */
    public static String format(double v) {
        if (v == 0) return Double.doubleToRawLongBits(v) < 0 ? "-0" : "0";
        if (v == Math.rint(v) && Math.abs(v) < 1e15) return Long.toString((long) v);
        return Double.toString(v);
    }

    public static void quote(StringBuilder sb, String s) {
        sb.append('"');
        for (int i = 0; i < s.length(); i++) {
            char c = s.charAt(i);
            switch (c) {
                case '"': sb.append("\\\""); break;
                case '\\': sb.append("\\\\"); break;
                case '\n': sb.append("\\n"); break;
                case '\r': sb.append("\\r"); break;
                case '\t': sb.append("\\t"); break;
                default:
                    if (c < 0x20) {
                        sb.append(String.format("\\u%04x", (int) c));
                    } else {
                        sb.append(c);
                    }
            }
        }
        sb.append('"');
    }
}
