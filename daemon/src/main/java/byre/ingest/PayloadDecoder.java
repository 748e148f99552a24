package byre.ingest;

import byre.config.PayloadFormat;
import byre.config.SensorConfig;
import byre.json.Json;
import byre.units.Unit;
import com.fasterxml.jackson.core.JsonParser;
import com.fasterxml.jackson.core.JsonToken;
import java.io.IOException;
import java.nio.charset.CharacterCodingException;
import java.nio.charset.CodingErrorAction;
import java.nio.charset.StandardCharsets;
import java.nio.ByteBuffer;
import java.time.Instant;
import java.time.OffsetDateTime;
import java.time.format.DateTimeParseException;
import java.util.regex.Pattern;

/** Turns a raw MQTT payload into a number (and maybe a time) as the sensor's configuration says. */
public final class PayloadDecoder {
    /** Payloads above this size are refused unread; no climate reading needs more. */
    public static final int MAX_PAYLOAD_BYTES = 4096;
    private static final Pattern DECIMAL = Pattern.compile("[+-]?(\\d+\\.?\\d*|\\.\\d+)([eE][+-]?\\d+)?");
    private static final Pattern NOT_FINITE_WORD = Pattern.compile("[+-]?(nan|inf|infinity)", Pattern.CASE_INSENSITIVE);
    /** RFC 8428 section 4.5.3: SenML times below 2^28 are relative to now. */
    private static final double SENML_RELATIVE_LIMIT = 268_435_456d;

    private PayloadDecoder() {}

    public static Decoded decode(SensorConfig sensor, byte[] payload, Instant arrival) {
        if (payload.length > MAX_PAYLOAD_BYTES) {
            return Decoded.rejected(RejectReason.TOO_LARGE, payload.length + " bytes");
        }
        // Nearly every payload is ASCII: no strict UTF-8 decoder (and its buffers) needed, and JSON is read from the bytes.
        String text = null;
        if (!isAscii(payload)) {
            try {
                text = StandardCharsets.UTF_8.newDecoder().onMalformedInput(CodingErrorAction.REPORT)
                        .onUnmappableCharacter(CodingErrorAction.REPORT).decode(ByteBuffer.wrap(payload)).toString().strip();
            } catch (CharacterCodingException e) {
                return Decoded.rejected(RejectReason.UNPARSEABLE, "payload is not UTF-8 text");
            }
        }
        PayloadFormat format = sensor.payload();
        switch (format.kind()) {
            case NUMBER: return number(text != null ? text : new String(payload, StandardCharsets.ISO_8859_1).strip(), sensor.unit());
            case JSON: return json(payload, text, format.selector(), sensor);
            default: return senml(payload, text, format.selector(), sensor.unit(), arrival);
        }
    }

    /** The payload as one JSON value: from the decoded text, or from the ASCII bytes; white space around it is stripped. */
    private static <T> T readJson(byte[] payload, String text, Json.ValueReader<T> reader) {
        if (text != null) return Json.read(text, reader);
        int from = 0;
        int to = payload.length;
        while (from < to && Character.isWhitespace(payload[from])) from++; // as String.strip does for ASCII
        while (to > from && Character.isWhitespace(payload[to - 1])) to--;
        return Json.read(payload, from, to - from, reader);
    }

    private static Decoded number(String text, Unit unit) {
        if (DECIMAL.matcher(text).matches()) {
            return finite(Double.parseDouble(text), unit, null);
        }
        if (NOT_FINITE_WORD.matcher(text).matches()) return Decoded.rejected(RejectReason.NOT_FINITE, "'" + clip(text) + "'");
        return Decoded.rejected(RejectReason.UNPARSEABLE, "expected a plain number, got '" + clip(text) + "'");
    }

    private static Decoded json(byte[] payload, String text, String path, SensorConfig sensor) {
        String timePath = sensor.timePath();
        Object v;
        Object t = null;
        try {
            if (timePath == null || timePath.equals(path)) {
                v = readJson(payload, text, Json.valuesAt(path))[0];
                if (timePath != null) t = v;
            } else {
                Object[] found = readJson(payload, text, Json.valuesAt(path, timePath));
                v = found[0];
                t = found[1];
            }
        } catch (Json.JsonException e) {
            return Decoded.rejected(RejectReason.UNPARSEABLE, "not JSON: " + e.getMessage());
        }
        if (v == null) return Decoded.rejected(RejectReason.MISSING_FIELD, "no '" + path + "' in the JSON payload");
        Instant time = null;
        if (timePath != null) {
            time = t == null ? null : jsonTime(t);
            if (t != null && time == null) {
                return Decoded.rejected(RejectReason.UNPARSEABLE, "'" + sensor.timePath() + "' is not a time: '" + clip(String.valueOf(t)) + "'");
            }
        }
        if (v instanceof Double d) return finite(d, sensor.unit(), time);
        if (v instanceof String s) {
            Decoded n = number(s.strip(), sensor.unit());
            return n.ok() ? Decoded.value(n.value(), n.unit(), time) : n;
        }
        return Decoded.rejected(RejectReason.UNPARSEABLE, "'" + path + "' is not a number");
    }

    private static Decoded senml(byte[] payload, String text, String name, Unit configured, Instant arrival) {
        try {
            return readJson(payload, text, new SenmlReader(name, configured, arrival));
        } catch (Json.JsonException e) {
            return Decoded.rejected(RejectReason.UNPARSEABLE, "not SenML JSON: " + e.getMessage());
        }
    }

    /**
     * The first record that names the sensor, read record by record: only the SenML fields are built. The records
     * after it are still passed over, so that a malformed pack is refused wherever it breaks. (A record rather than a
     * lambda: see {@code Json.valuesAt}.)
     */
    private record SenmlReader(String name, Unit configured, Instant arrival) implements Json.ValueReader<Decoded> {
        @Override
        public Decoded read(JsonParser p) throws IOException {
            if (p.currentToken() != JsonToken.START_ARRAY) {
                p.skipChildren();
                return Decoded.rejected(RejectReason.UNPARSEABLE, "SenML must be a JSON array of records");
            }
            String baseName = "";
            double baseTime = 0;
            Decoded result = null;
            while (p.nextToken() != JsonToken.END_ARRAY) {
                if (result != null) {
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
                    String field = p.currentName();
                    p.nextToken();
                    switch (field) { // a repeated field: the last one counts
                        case "bn": bn = Json.value(p); break;
                        case "bt": bt = Json.value(p); break;
                        case "n": n = Json.value(p); break;
                        case "v": v = Json.value(p); break;
                        case "u": u = Json.value(p); break;
                        case "t": t = Json.value(p); break;
                        default: p.skipChildren(); break;
                    }
                }
                if (bn instanceof String s) baseName = s;
                if (bt instanceof Double d) baseTime = d;
                String recordName = n instanceof String s ? s : "";
                String full = baseName + recordName;
                if (!full.equals(name) && !recordName.equals(name)) continue;
                result = senmlRecord(full, v, u, t, baseTime, configured, arrival);
            }
            return result != null ? result : Decoded.rejected(RejectReason.MISSING_FIELD, "no SenML record named '" + name + "'");
        }
    }

    private static Decoded senmlRecord(String full, Object v, Object u, Object t, double baseTime, Unit configured, Instant arrival) {
        if (!(v instanceof Double value)) return Decoded.rejected(RejectReason.UNPARSEABLE, "SenML record '" + full + "' has no numeric v");
        Unit unit = configured;
        if (u instanceof String s) {
            unit = senmlUnit(s);
            if (unit == null || unit.dimension() != configured.dimension()) {
                return Decoded.rejected(RejectReason.BAD_UNIT, "SenML unit '" + clip(s) + "' does not fit " + configured.dimension().name().toLowerCase().replace('_', ' '));
            }
        }
        double time = baseTime + (t instanceof Double d ? d : 0);
        Instant at = null;
        if (time != 0) {
            at = time < SENML_RELATIVE_LIMIT ? arrival.plusMillis(Math.round(time * 1000)) : Instant.ofEpochMilli(Math.round(time * 1000));
        }
        return finite(value, unit, at);
    }

    private static boolean isAscii(byte[] b) {
        for (byte x : b) if (x < 0) return false;
        return true;
    }

    /** SenML unit names (RFC 8428 section 12.1) for the quantities byre reads. */
    static Unit senmlUnit(String u) {
        switch (u) {
            case "Cel": return Unit.C;
            case "K": return Unit.K;
            case "%RH": case "%": return Unit.PERCENT;
            case "m/s": return Unit.M_PER_S;
            case "Pa": return Unit.PA;
            case "kPa": return Unit.KPA;
            case "hPa": return Unit.HPA;
            case "W/m2": return Unit.W_PER_M2;
            default: return null;
        }
    }

    /** Epoch seconds or milliseconds (numbers above 1e11 are milliseconds), or an ISO 8601 string. */
    static Instant jsonTime(Object t) {
        if (t instanceof Double d) {
            if (!Double.isFinite(d) || d < 0 || d > 1e14) return null;
            return d > 1e11 ? Instant.ofEpochMilli(d.longValue()) : Instant.ofEpochMilli(Math.round(d * 1000));
        }
        if (t instanceof String s) {
            try {
                return OffsetDateTime.parse(s).toInstant();
            } catch (DateTimeParseException e) {
                try {
                    return Instant.parse(s);
                } catch (DateTimeParseException e2) {
                    return null;
                }
            }
        }
        return null;
    }

    private static Decoded finite(double v, Unit unit, Instant time) {
        if (!Double.isFinite(v)) return Decoded.rejected(RejectReason.NOT_FINITE, Double.toString(v));
        return Decoded.value(v, unit, time);
    }

    static String clip(String s) {
        String oneLine = s.replaceAll("[\\p{Cntrl}]", "?");
        return oneLine.length() > 40 ? oneLine.substring(0, 40) + "…" : oneLine;
    }
}
