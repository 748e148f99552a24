package byre.json;

import java.util.Locale;

/** Builds one JSON object in insertion order, for events and published streams. */
public final class JsonWriter {
    private final StringBuilder sb = new StringBuilder(128).append('{');
    private boolean first = true;

    public JsonWriter field(String name, String value) {
        key(name);
        if (value == null) {
            sb.append("null");
        } else {
            quote(sb, value);
        }
        return this;
    }

    /** A number; NaN and infinities become null (JSON has no such numbers). */
    public JsonWriter field(String name, double value) {
        key(name);
        if (Double.isFinite(value)) {
            sb.append(format(value));
        } else {
            sb.append("null");
        }
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

    /** Inserts already-serialised JSON (an object or array built elsewhere). */
    public JsonWriter raw(String name, String json) {
        key(name);
        sb.append(json);
        return this;
    }

    @Override
    public String toString() {
        return sb + "}";
    }

    private void key(String name) {
        if (!first) sb.append(',');
        first = false;
        quote(sb, name);
        sb.append(':');
    }

    /** Shortest round-tripping decimal, without exponent for everyday magnitudes. */
    public static String format(double v) {
        if (v == Math.rint(v) && Math.abs(v) < 1e15) return Long.toString((long) v);
        String s = Double.toString(v);
        if (s.contains("E")) s = String.format(Locale.ROOT, "%.10g", v).replaceAll("0+$", "");
        return s;
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
