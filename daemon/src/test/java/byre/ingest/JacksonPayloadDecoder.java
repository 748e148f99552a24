package byre.ingest;

import byre.config.PayloadFormat;
import byre.config.SensorConfig;
import byre.units.Unit;
import com.fasterxml.jackson.core.JsonFactory;
import com.fasterxml.jackson.core.JsonParser;
import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.core.JsonToken;
import com.fasterxml.jackson.core.StreamReadFeature;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.time.Instant;
import java.util.regex.Pattern;

/**
 * {@link PayloadDecoder}'s job done with Jackson's streaming {@link JsonParser} instead of byre's own reader: the
 * baseline of {@code byre.bench.JsonReaderBench}, not used by byre. It picks out the same members (dotted paths,
 * array indices, the last of repeated names), reads numbers as the same exact doubles and checks the whole text,
 * straight from the payload's bytes. What comes after the JSON (time forms, SenML units, the payload size limit)
 * and plain-number payloads are {@link PayloadDecoder}'s own code, so only the JSON reading differs.
 */
public final class JacksonPayloadDecoder {
    private static final Pattern DECIMAL = Pattern.compile("[+-]?(\\d+\\.?\\d*|\\.\\d+)([eE][+-]?\\d+)?");
    private static final Pattern NOT_FINITE_WORD = Pattern.compile("[+-]?(nan|inf|infinity)", Pattern.CASE_INSENSITIVE);
    private static final double SENML_RELATIVE_LIMIT = 268_435_456d;
    /** Stands for an object or array where a value was looked for (byre's reader gives a map or list there). */
    private static final Object CONTAINER = new Object() {
        @Override
        public String toString() {
            return "{...}";
        }
    };

    private final JsonFactory factory;

    /** @param fastDoubles Jackson's own decimal reader (exact as well) instead of {@code Double.parseDouble} */
    public JacksonPayloadDecoder(boolean fastDoubles) {
        factory = fastDoubles ? JsonFactory.builder().enable(StreamReadFeature.USE_FAST_DOUBLE_PARSER).build() : new JsonFactory();
    }

    public JsonFactory factory() {
        return factory;
    }

    public Decoded decode(SensorConfig sensor, byte[] payload, Instant arrival) {
        PayloadFormat format = sensor.payload();
        if (format.kind() == PayloadFormat.Kind.NUMBER || payload.length > PayloadDecoder.MAX_PAYLOAD_BYTES) {
            return PayloadDecoder.decode(sensor, payload, arrival);
        }
        try (JsonParser p = factory.createParser(payload)) {
            return format.kind() == PayloadFormat.Kind.JSON ? json(p, sensor) : senml(p, format.selector(), sensor.unit(), arrival);
        } catch (JsonProcessingException e) {
            return Decoded.rejected(RejectReason.UNPARSEABLE, "not JSON: " + e.getOriginalMessage());
        } catch (IOException e) {
            throw new UncheckedIOException(e); // reading a byte array does no I/O
        }
    }

    private static Decoded json(JsonParser p, SensorConfig sensor) throws IOException {
        String path = sensor.payload().selector();
        String timePath = sensor.timePath();
        String[][] paths = timePath == null || timePath.equals(path)
                ? new String[][] {steps(path)} : new String[][] {steps(path), steps(timePath)};
        Object[] found = new Object[paths.length];
        if (p.nextToken() == null) return Decoded.rejected(RejectReason.UNPARSEABLE, "not JSON: no value");
        select(p, paths, 0, (1 << paths.length) - 1, found);
        if (p.nextToken() != null) return Decoded.rejected(RejectReason.UNPARSEABLE, "not JSON: text after the value");
        Object v = found[0];
        Object t = timePath == null ? null : found[paths.length - 1];
        if (v == null) return Decoded.rejected(RejectReason.MISSING_FIELD, "no '" + path + "' in the JSON payload");
        Instant time = null;
        if (timePath != null) {
            time = t == null ? null : PayloadDecoder.jsonTime(t);
            if (t != null && time == null) {
                return Decoded.rejected(RejectReason.UNPARSEABLE, "'" + timePath + "' is not a time: '" + PayloadDecoder.clip(String.valueOf(t)) + "'");
            }
        }
        if (v instanceof Double d) return finite(d, sensor.unit(), time);
        if (v instanceof String s) {
            Decoded n = number(s.strip(), sensor.unit());
            return n.ok() ? Decoded.value(n.value(), n.unit(), time) : n;
        }
        return Decoded.rejected(RejectReason.UNPARSEABLE, "'" + path + "' is not a number");
    }

    private static String[] steps(String dottedPath) {
        return dottedPath.indexOf('.') < 0 ? new String[] {dottedPath} : dottedPath.split("\\.", -1);
    }

    /**
     * At the start of a value: stores it in {@code found[i]} for each path {@code i} in {@code mask} that ends at this
     * depth, descends for those that go deeper, and passes over (still checking) everything else.
     */
    private static void select(JsonParser p, String[][] paths, int depth, int mask, Object[] found) throws IOException {
        JsonToken token = p.currentToken();
        int deeper = 0;
        for (int i = 0; i < paths.length; i++) {
            if ((mask & (1 << i)) == 0) continue;
            if (paths[i].length == depth) {
                found[i] = scalar(p, token);
            } else {
                deeper |= 1 << i;
            }
        }
        if (deeper == 0 || (token != JsonToken.START_OBJECT && token != JsonToken.START_ARRAY)) {
            p.skipChildren();
            return;
        }
        if (token == JsonToken.START_OBJECT) {
            while (p.nextToken() == JsonToken.FIELD_NAME) {
                String name = p.currentName();
                int next = 0;
                for (int i = 0; i < paths.length; i++) {
                    if ((deeper & (1 << i)) != 0 && paths[i][depth].equals(name)) {
                        next |= 1 << i;
                        found[i] = null; // a repeated name replaces the earlier member, as in a map
                    }
                }
                p.nextToken();
                if (next == 0) {
                    p.skipChildren();
                } else {
                    select(p, paths, depth + 1, next, found);
                }
            }
            return;
        }
        int[] wanted = new int[paths.length];
        for (int i = 0; i < paths.length; i++) wanted[i] = (deeper & (1 << i)) == 0 ? -1 : arrayIndex(paths[i][depth]);
        for (int index = 0; p.nextToken() != JsonToken.END_ARRAY; index++) {
            int next = 0;
            for (int i = 0; i < paths.length; i++) if (wanted[i] == index) next |= 1 << i;
            if (next == 0) {
                p.skipChildren();
            } else {
                select(p, paths, depth + 1, next, found);
            }
        }
    }

    private static int arrayIndex(String step) {
        try {
            int i = Integer.parseInt(step);
            return i >= 0 ? i : -1;
        } catch (NumberFormatException e) {
            return -1;
        }
    }

    /** The value at the current token as byre's reader types it: Double, String, Boolean, null, or {@link #CONTAINER}. */
    private static Object scalar(JsonParser p, JsonToken token) throws IOException {
        switch (token) {
            case VALUE_NUMBER_INT: case VALUE_NUMBER_FLOAT: return p.getDoubleValue();
            case VALUE_STRING: return p.getText();
            case VALUE_TRUE: return Boolean.TRUE;
            case VALUE_FALSE: return Boolean.FALSE;
            case VALUE_NULL: return null;
            default: return CONTAINER;
        }
    }

    private static Decoded senml(JsonParser p, String name, Unit configured, Instant arrival) throws IOException {
        JsonToken first = p.nextToken();
        if (first == null) return Decoded.rejected(RejectReason.UNPARSEABLE, "not SenML JSON: no value");
        if (first != JsonToken.START_ARRAY) {
            p.skipChildren();
            if (p.nextToken() != null) return Decoded.rejected(RejectReason.UNPARSEABLE, "not SenML JSON: text after the value");
            return Decoded.rejected(RejectReason.UNPARSEABLE, "SenML must be a JSON array of records");
        }
        String baseName = "";
        double baseTime = 0;
        Decoded result = null;
        while (p.nextToken() != JsonToken.END_ARRAY) {
            if (result != null) { // decided; the rest is still checked, as byre's reader checks it
                p.skipChildren();
                continue;
            }
            if (p.currentToken() != JsonToken.START_OBJECT) {
                result = Decoded.rejected(RejectReason.UNPARSEABLE, "SenML records must be JSON objects");
                p.skipChildren();
                continue;
            }
            Object bn = null, bt = null, n = null, v = null, u = null, t = null;
            while (p.nextToken() == JsonToken.FIELD_NAME) {
                String member = p.currentName();
                JsonToken value = p.nextToken();
                switch (member) {
                    case "bn": bn = scalar(p, value); break;
                    case "bt": bt = scalar(p, value); break;
                    case "n": n = scalar(p, value); break;
                    case "v": v = scalar(p, value); break;
                    case "u": u = scalar(p, value); break;
                    case "t": t = scalar(p, value); break;
                    default: break;
                }
                p.skipChildren();
            }
            if (bn instanceof String s) baseName = s;
            if (bt instanceof Double d) baseTime = d;
            String recordName = n instanceof String s ? s : "";
            String full = baseName + recordName;
            if (!full.equals(name) && !recordName.equals(name)) continue;
            result = senmlValue(full, v, u, t, baseTime, configured, arrival);
        }
        if (p.nextToken() != null) return Decoded.rejected(RejectReason.UNPARSEABLE, "not SenML JSON: text after the value");
        return result != null ? result : Decoded.rejected(RejectReason.MISSING_FIELD, "no SenML record named '" + name + "'");
    }

    private static Decoded senmlValue(String full, Object v, Object u, Object t, double baseTime, Unit configured, Instant arrival) {
        if (!(v instanceof Double value)) return Decoded.rejected(RejectReason.UNPARSEABLE, "SenML record '" + full + "' has no numeric v");
        Unit unit = configured;
        if (u instanceof String s) {
            unit = PayloadDecoder.senmlUnit(s);
            if (unit == null || unit.dimension() != configured.dimension()) {
                return Decoded.rejected(RejectReason.BAD_UNIT, "SenML unit '" + PayloadDecoder.clip(s) + "' does not fit");
            }
        }
        double time = baseTime + (t instanceof Double d ? d : 0);
        Instant at = null;
        if (time != 0) {
            at = time < SENML_RELATIVE_LIMIT ? arrival.plusMillis(Math.round(time * 1000)) : Instant.ofEpochMilli(Math.round(time * 1000));
        }
        return finite(value, unit, at);
    }

    private static Decoded number(String text, Unit unit) {
        if (DECIMAL.matcher(text).matches()) return finite(Double.parseDouble(text), unit, null);
        if (NOT_FINITE_WORD.matcher(text).matches()) return Decoded.rejected(RejectReason.NOT_FINITE, "'" + PayloadDecoder.clip(text) + "'");
        return Decoded.rejected(RejectReason.UNPARSEABLE, "expected a plain number, got '" + PayloadDecoder.clip(text) + "'");
    }

    private static Decoded finite(double v, Unit unit, Instant time) {
        if (!Double.isFinite(v)) return Decoded.rejected(RejectReason.NOT_FINITE, Double.toString(v));
        return Decoded.value(v, unit, time);
    }
}
