package byre.ingest;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.config.PayloadFormat;
import byre.config.SensorConfig;
import byre.units.Quantity;
import byre.units.Unit;
import java.nio.charset.StandardCharsets;
import java.time.Instant;
import org.junit.jupiter.api.Test;

/** JSON payloads at the edges: what byre accepts, and the reason and detail of what it refuses. */
class PayloadDecoderTest {
    static final Instant ARRIVAL = Instant.parse("2026-07-14T13:35:00Z");
    static final SensorConfig V_TS = new SensorConfig("pen3-dry", "larkmoor/calf-barn/pen3/dry", Quantity.DRY_BULB, Unit.C,
            new PayloadFormat(PayloadFormat.Kind.JSON, "v"), "ts", 0, 1);
    static final SensorConfig NESTED = new SensorConfig("pen3-air", "larkmoor/calf-barn/pen3/air", Quantity.AIR_SPEED, Unit.M_PER_S,
            new PayloadFormat(PayloadFormat.Kind.JSON, "sensor.speed"), "meta.ts", 0, 2);
    static final SensorConfig SENML = new SensorConfig("shed-rh", "larkmoor/cow-shed/senml", Quantity.RH, Unit.PERCENT,
            new PayloadFormat(PayloadFormat.Kind.SENML, "shed/rh"), null, 0, 3);

    static Decoded decode(SensorConfig sensor, String payload) {
        return PayloadDecoder.decode(sensor, payload.getBytes(StandardCharsets.UTF_8), ARRIVAL);
    }

    static void refused(SensorConfig sensor, String payload, RejectReason reason, String detail) {
        Decoded d = decode(sensor, payload);
        assertEquals(reason, d.reject(), payload + ": " + d.detail());
        assertTrue(d.detail().startsWith(detail), payload + ": " + d.detail());
    }

    @Test
    void readsTopLevelNestedAndSenmlValues() {
        Decoded d = decode(V_TS, "{\"id\":\"pen3\",\"v\":21.37,\"ts\":1784036100123}");
        assertEquals(21.37, d.value());
        assertEquals(Instant.ofEpochMilli(1784036100123L), d.payloadTime());
        Decoded n = decode(NESTED, "{\"sensor\":{\"id\":\"fan\",\"speed\":\" 0.8 \"},\"meta\":{\"ts\":\"2026-07-14T13:34:00Z\"}}");
        assertEquals(0.8, n.value());
        assertEquals(Instant.parse("2026-07-14T13:34:00Z"), n.payloadTime());
        Decoded s = decode(SENML, "[{\"bn\":\"shed/\",\"bt\":1784036100,\"n\":\"dry\",\"u\":\"Cel\",\"v\":24.5},{\"n\":\"rh\",\"u\":\"%RH\",\"v\":70,\"t\":-5}]");
        assertEquals(70.0, s.value());
        assertEquals(Instant.ofEpochSecond(1784036095), s.payloadTime());
    }

    /** Where Jackson's defaults and byre's earlier reader differed, byre keeps its earlier answer. */
    @Test
    void edgesKeepTheirEarlierAnswers() {
        assertEquals(Double.doubleToRawLongBits(-0.0), Double.doubleToRawLongBits(decode(V_TS, "{\"v\":-0}").value()), "-0 is negative zero");
        assertEquals(1.0, decode(V_TS, "\f {\"v\":1}\u000b\n").value(), "white space around the payload is stripped, not only JSON's");
        refused(V_TS, "\uFEFF{\"v\":1}", RejectReason.UNPARSEABLE, "not JSON: Unexpected character");
        refused(V_TS, "{\"x\":" + "[".repeat(33) + "]".repeat(33) + ",\"v\":1}", RejectReason.UNPARSEABLE,
                "not JSON: Document nesting depth (33) exceeds the maximum allowed (32)");
        refused(V_TS, "{\"v\":1" + "0".repeat(1000) + "}", RejectReason.UNPARSEABLE, "not JSON: Number value length (1001)");
        refused(V_TS, "{\"v\":1" + "0".repeat(400) + "}", RejectReason.NOT_FINITE, "Infinity");
        refused(V_TS, "{\"v\":1,\"v\":\"x\"}", RejectReason.UNPARSEABLE, "expected a plain number, got 'x'");
        refused(V_TS, "{\"v\":1,\"ts\":[1]}", RejectReason.UNPARSEABLE, "'ts' is not a time: '[1.0]'");
        refused(NESTED, "{\"sensor\":{\"speed\":1},\"sensor\":{}}", RejectReason.MISSING_FIELD, "no 'sensor.speed' in the JSON payload");
    }

    /** A payload is UTF-8 (RFC 8259 section 8.1): zero bytes do not make Jackson read it as UTF-16 or UTF-32. */
    @Test
    void zeroBytesAreNeverTakenForAnotherEncoding() {
        refused(V_TS, "{\0\"\0v\0\"\0:\0001\0}\0", RejectReason.UNPARSEABLE, "not JSON: Illegal character ((CTRL-CHAR, code 0))");
        refused(V_TS, "\0{\"v\":1}", RejectReason.UNPARSEABLE, "not JSON: Illegal character ((CTRL-CHAR, code 0))");
        refused(V_TS, "\0\0\0{", RejectReason.UNPARSEABLE, "not JSON: Illegal character ((CTRL-CHAR, code 0))");
    }

    /** JSON allows an escaped lone surrogate; Jackson's byte parser refuses one in a member name (it has no UTF-8). */
    @Test
    void aLoneSurrogateEscapeIsKeptInAValueAndRefusedInAName() {
        assertEquals(1.0, decode(V_TS, "{\"id\":\"pen\\ud800\",\"v\":1}").value());
        refused(V_TS, "{\"id\\ud800\":\"pen\",\"v\":1}", RejectReason.UNPARSEABLE, "not JSON: Broken surrogate pair in field name");
    }

    @Test
    void malformedJsonAnywhereIsRefusedWithWhere() {
        refused(V_TS, "{\"v\":21.4,\"x\":[1,2}", RejectReason.UNPARSEABLE, "not JSON: Unexpected close marker '}': expected ']'");
        assertTrue(decode(V_TS, "{\"v\":21.4,\"x\":[1,2}").detail().endsWith("at line 1, column 19"));
        refused(V_TS, "{\"v\":21.4} x", RejectReason.UNPARSEABLE, "not JSON: Unrecognized token 'x'");
        refused(V_TS, "{\"v\":21.4}{\"v\":1}", RejectReason.UNPARSEABLE, "not JSON: text after the JSON value at line 1, column 11");
        refused(V_TS, "", RejectReason.UNPARSEABLE, "not JSON: no JSON value in the text");
        refused(SENML, "[{\"n\":\"shed/rh\",\"v\":50},{\"n\":\"x\",\"v\":1},]", RejectReason.UNPARSEABLE, "not SenML JSON: ");
        refused(SENML, "[{\"n\":\"shed/rh\",\"v\":50}] 1", RejectReason.UNPARSEABLE, "not SenML JSON: text after the JSON value");
        refused(SENML, "{\"n\":\"shed/rh\",\"v\":50}", RejectReason.UNPARSEABLE, "SenML must be a JSON array of records");
        refused(SENML, "[1,{\"n\":\"shed/rh\",\"v\":50}]", RejectReason.UNPARSEABLE, "SenML records must be JSON objects");
        refused(SENML, "[{\"n\":\"shed/rh\",\"v\":\"50\"}]", RejectReason.UNPARSEABLE, "SenML record 'shed/rh' has no numeric v");
        refused(SENML, "[{\"n\":\"shed/rh\",\"u\":\"Cel\",\"v\":50}]", RejectReason.BAD_UNIT, "SenML unit 'Cel' does not fit");
        refused(SENML, "[{\"n\":\"other\",\"v\":50}]", RejectReason.MISSING_FIELD, "no SenML record named 'shed/rh'");
    }
}
