package byre.ingest;

import byre.config.PayloadFormat;
import byre.config.SensorConfig;
import byre.json.Json;
import byre.units.Unit;
import java.nio.charset.CharacterCodingException;
import java.nio.charset.CodingErrorAction;
import java.nio.charset.StandardCharsets;
import java.nio.ByteBuffer;
import java.time.Instant;
import java.time.OffsetDateTime;
import java.time.format.DateTimeParseException;
import java.util.List;
import java.util.Map;
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
        String text;
        if (isAscii(payload)) {
            // Nearly every payload is ASCII: no strict UTF-8 decoder (and its buffers) needed.
            text = new String(payload, StandardCharsets.ISO_8859_1).strip();
        } else try {
            text = StandardCharsets.UTF_8.newDecoder().onMalformedInput(CodingErrorAction.REPORT)
                    .onUnmappableCharacter(CodingErrorAction.REPORT).decode(ByteBuffer.wrap(payload)).toString().strip();
        } catch (CharacterCodingException e) {
            return Decoded.rejected(RejectReason.UNPARSEABLE, "payload is not UTF-8 text");
        }
        PayloadFormat format = sensor.payload();
        switch (format.kind()) {
            case NUMBER: return number(text, sensor.unit());
            case JSON: return json(text, format.selector(), sensor);
            default: return senml(text, format.selector(), sensor.unit(), arrival);
        }
    }

    private static Decoded number(String text, Unit unit) {
        if (DECIMAL.matcher(text).matches()) {
            return finite(Double.parseDouble(text), unit, null);
        }
        if (NOT_FINITE_WORD.matcher(text).matches()) return Decoded.rejected(RejectReason.NOT_FINITE, "'" + clip(text) + "'");
        return Decoded.rejected(RejectReason.UNPARSEABLE, "expected a plain number, got '" + clip(text) + "'");
    }

    private static Decoded json(String text, String path, SensorConfig sensor) {
        String timePath = sensor.timePath();
        Object v;
        Object t = null;
        try {
            // Top-level names (the usual {"v": 21.4, "ts": ...}) are picked out without building the document.
            boolean oneName = timePath == null || timePath.equals(path);
            Object[] members = path.indexOf('.') < 0 && (timePath == null || timePath.indexOf('.') < 0)
                    ? (oneName ? Json.members(text, path) : Json.members(text, path, timePath)) : null;
            if (members != null) {
                v = members[0];
                if (timePath != null) t = oneName ? members[0] : members[1];
            } else {
                Object root = Json.parse(text);
                v = Json.path(root, path);
                if (timePath != null) t = Json.path(root, timePath);
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

    private static Decoded senml(String text, String name, Unit configured, Instant arrival) {
        Object root;
        try {
            root = Json.parse(text);
        } catch (Json.JsonException e) {
            return Decoded.rejected(RejectReason.UNPARSEABLE, "not SenML JSON: " + e.getMessage());
        }
        if (!(root instanceof List<?> pack)) return Decoded.rejected(RejectReason.UNPARSEABLE, "SenML must be a JSON array of records");
        String baseName = "";
        double baseTime = 0;
        for (Object o : pack) {
            if (!(o instanceof Map<?, ?> rec)) return Decoded.rejected(RejectReason.UNPARSEABLE, "SenML records must be JSON objects");
            if (rec.get("bn") instanceof String bn) baseName = bn;
            if (rec.get("bt") instanceof Double bt) baseTime = bt;
            String n = rec.get("n") instanceof String s ? s : "";
            String full = baseName + n;
            if (!full.equals(name) && !n.equals(name)) continue;
            Object v = rec.get("v");
            if (!(v instanceof Double value)) return Decoded.rejected(RejectReason.UNPARSEABLE, "SenML record '" + full + "' has no numeric v");
            Unit unit = configured;
            if (rec.get("u") instanceof String u) {
                unit = senmlUnit(u);
                if (unit == null || unit.dimension() != configured.dimension()) {
                    return Decoded.rejected(RejectReason.BAD_UNIT, "SenML unit '" + clip(u) + "' does not fit " + configured.dimension().name().toLowerCase().replace('_', ' '));
                }
            }
            double t = baseTime + (rec.get("t") instanceof Double td ? td : 0);
            Instant time = null;
            if (t != 0) {
                time = t < SENML_RELATIVE_LIMIT ? arrival.plusMillis(Math.round(t * 1000)) : Instant.ofEpochMilli(Math.round(t * 1000));
            }
            return finite(value, unit, time);
        }
        return Decoded.rejected(RejectReason.MISSING_FIELD, "no SenML record named '" + name + "'");
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
