package byre.fuzz;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

import byre.config.PayloadFormat;
import byre.config.SensorConfig;
import byre.ingest.Decoded;
import byre.ingest.PayloadDecoder;
import byre.json.Json;
import byre.units.Quantity;
import byre.units.Unit;
import java.nio.charset.StandardCharsets;
import java.time.Instant;
import java.util.List;
import org.junit.jupiter.api.Test;

/**
 * Seeded mutation fuzzing of what a sensor can send: {@link PayloadDecoder#decode} must never throw and
 * must give either a finite value with a unit or a rejection with a reason and a detail;
 * {@link Json#parse} may throw only {@link Json.JsonException}. 20,000 inputs per format.
 */
class PayloadDecoderFuzzTest {
    static final Instant ARRIVAL = Instant.parse("2026-07-14T13:35:00Z");

    static final SensorConfig NUMBER = new SensorConfig("pen1-dry", "larkmoor/calf-barn/pen1/dry", Quantity.DRY_BULB, Unit.F,
            PayloadFormat.NUMBER, null, 0, 1);
    static final SensorConfig JSON = new SensorConfig("pen1-air", "larkmoor/calf-barn/pen1/air", Quantity.AIR_SPEED, Unit.M_PER_S,
            new PayloadFormat(PayloadFormat.Kind.JSON, "sensor.speed"), "ts", 0, 2);
    static final SensorConfig JSON_ISO_TIME = new SensorConfig("pen2-air", "larkmoor/calf-barn/pen2/air", Quantity.AIR_SPEED,
            Unit.M_PER_S, new PayloadFormat(PayloadFormat.Kind.JSON, "readings.0.v"), "readings.0.at", 0, 3);
    static final SensorConfig SENML = new SensorConfig("shed-rh", "larkmoor/cow-shed/senml", Quantity.RH, Unit.PERCENT,
            new PayloadFormat(PayloadFormat.Kind.SENML, "shed/rh"), null, 0, 4);

    static final List<String> NUMBER_CORPUS = List.of("41", "-3.5", " 21.37\n", "+0.5", "1e2", ".75", "-0", "100.000");
    static final List<String> JSON_CORPUS = List.of(
            "{\"sensor\":{\"speed\":1.2},\"ts\":1784036100}",
            "{\"sensor\":{\"speed\":\"0.8\"},\"ts\":1784036100123}",
            "{\"sensor\": {\"speed\": 3e-1, \"id\": \"pen1\\u0041\"}, \"ts\": \"2026-07-14T13:35:00Z\", \"ok\": true, \"x\": null}",
            "{\"readings\":[{\"v\":0.4,\"at\":\"2026-07-14T13:35:00+01:00\"}],\"sensor\":{\"speed\":[1,2,{\"a\":false}]}}");
    static final List<String> SENML_CORPUS = List.of(
            "[{\"bn\":\"shed/\",\"n\":\"rh\",\"u\":\"%RH\",\"v\":71.2}]",
            "[{\"bn\":\"shed/\",\"bt\":1784036100,\"n\":\"dry\",\"u\":\"Cel\",\"v\":24.5},{\"n\":\"rh\",\"t\":-5,\"v\":70}]",
            "[{\"n\":\"shed/rh\",\"v\":55.5,\"t\":12}]",
            "[{\"bn\":\"shed/\",\"bt\":1.784036100e9},{\"n\":\"rh\",\"u\":\"%\",\"v\":60,\"t\":0.5}]");
    static final String[] JSON_TOKENS = {"{", "}", "[", "]", ",", ":", "\"", "\\", "\\u", "\\ud800", "\\u00zz", "null", "true",
            "fals", "\"v\":", "\"t\":", "\"bt\":", "\"bn\":", "\"u\":\"K\"", "\"u\":\"Pa\"", "\"u\":\"lux\"", "\"ts\":\"x\"", " ",
            "\t", "\n", "\u0000", "\u0001", "\u00e9", "\ud83d\udc04", "\"n\":\"shed/rh\"", "{\"n\":\"rh\",\"v\":1}", "-", "e", ".",
            "\"speed\":", "\"sensor\":"};

    /** Decodes and checks the contract; returns a failure description or null. */
    static String check(SensorConfig sensor, byte[] payload) {
        Decoded d;
        try {
            d = PayloadDecoder.decode(sensor, payload, ARRIVAL);
        } catch (RuntimeException | StackOverflowError e) {
            return "decode threw " + e;
        }
        if (d == null) return "decode returned null";
        if (d.ok()) {
            if (!Double.isFinite(d.value())) return "accepted a value that is not finite: " + d.value();
            if (d.unit() == null) return "accepted without a unit";
        } else if (d.detail() == null || d.reject().id().isEmpty()) {
            return "rejected without a detail";
        }
        return null;
    }

    static void fuzz(SensorConfig sensor, List<String> corpus, String[] tokens, long seed) {
        Mutator m = new Mutator(Mutator.seed(seed), corpus, tokens, "[", "]");
        int accepted = 0;
        for (int i = 0; i < Mutator.iterations(); i++) {
            byte[] input = m.next();
            String problem = check(sensor, input);
            if (problem != null) fail("input #" + i + " (seed " + seed + ") " + Mutator.literal(input) + ": " + problem);
            if (PayloadDecoder.decode(sensor, input, ARRIVAL).ok()) accepted++;
        }
        // A fuzzer whose inputs are all rejected at the first byte tests nothing: some must still decode.
        assertTrue(accepted > 0, "no mutated input decoded at all");
    }

    @Test
    void numberPayloads() {
        fuzz(NUMBER, NUMBER_CORPUS, new String[] {" ", "\n", "-", "+", ".", "e", "E", "e+", "\u00a0", "\u2009", "Infinity", "nan",
                "\u0000", "x", "٣"}, 71);
    }

    @Test
    void jsonPayloads() {
        fuzz(JSON, JSON_CORPUS, JSON_TOKENS, 72);
    }

    @Test
    void jsonPayloadsWithAnIsoTimeInAnArray() {
        fuzz(JSON_ISO_TIME, JSON_CORPUS, JSON_TOKENS, 73);
    }

    @Test
    void senmlPayloads() {
        fuzz(SENML, SENML_CORPUS, JSON_TOKENS, 74);
    }

    @Test
    void jsonParseThrowsOnlyItsOwnException() {
        Mutator m = new Mutator(Mutator.seed(75), concat(JSON_CORPUS, SENML_CORPUS), JSON_TOKENS, "{\"a\":[", "]}");
        for (int i = 0; i < Mutator.iterations(); i++) {
            String text = new String(m.next(), StandardCharsets.UTF_8);
            try {
                Json.parse(text);
            } catch (Json.JsonException expected) {
                assertNotNull(expected.getMessage());
            } catch (RuntimeException | StackOverflowError e) {
                fail("input #" + i + " " + Mutator.literal(text.getBytes(StandardCharsets.UTF_8)) + ": Json.parse threw " + e);
            }
        }
    }

    static List<String> concat(List<String> a, List<String> b) {
        return java.util.stream.Stream.concat(a.stream(), b.stream()).toList();
    }

    // ---- regressions: inputs the fuzzer once found, kept so they stay fixed ----

    @Test
    void theCorpusItselfDecodes() {
        for (String s : NUMBER_CORPUS) assertNull(check(NUMBER, s.getBytes(StandardCharsets.UTF_8)), s);
        for (String s : NUMBER_CORPUS) assertTrue(PayloadDecoder.decode(NUMBER, s.getBytes(StandardCharsets.UTF_8), ARRIVAL).ok(), s);
        for (String s : JSON_CORPUS.subList(0, 3)) assertTrue(PayloadDecoder.decode(JSON, s.getBytes(StandardCharsets.UTF_8), ARRIVAL).ok(), s);
        for (String s : SENML_CORPUS) assertTrue(PayloadDecoder.decode(SENML, s.getBytes(StandardCharsets.UTF_8), ARRIVAL).ok(), s);
    }
}
