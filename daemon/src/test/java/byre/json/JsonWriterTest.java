package byre.json;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Random;
import org.junit.jupiter.api.Test;

class JsonWriterTest {
    /** Bit-for-bit equality, so -0.0 and 0.0 differ. */
    private static void assertRoundTrips(double v) {
        String text = JsonWriter.format(v);
        assertEquals(Double.doubleToRawLongBits(v), Double.doubleToRawLongBits(Double.parseDouble(text)), v + " written as " + text);
        // and byre's own reader reads the member back as the same double
        Object read = ((Map<?, ?>) Json.parse(new JsonWriter().field("v", v).toString())).get("v");
        assertEquals(Double.doubleToRawLongBits(v), Double.doubleToRawLongBits((Double) read), v + " read back as " + read);
    }

    @Test
    void theNumbersTheOldFormatBroke() {
        // %.10g with trailing zeros stripped wrote 1e20 as 1.000000000e+2 (read back as 100) and 1e-10 as 1.000000000e-1
        for (double v : new double[] {1e20, 1e-10, -1e20, 1e-100, 1e100, 1.5e300, 2.5e-7, 1e15, 1e16, 123456789012345678.0}) {
            assertRoundTrips(v);
        }
        assertEquals("100000000000000000000", new java.math.BigDecimal(JsonWriter.format(1e20)).toPlainString());
    }

    @Test
    void edgesOfTheDoubles() {
        double[] edges = {0.0, -0.0, Double.MIN_VALUE, -Double.MIN_VALUE, Double.MIN_NORMAL, Math.nextDown(Double.MIN_NORMAL),
            Double.MAX_VALUE, -Double.MAX_VALUE, Math.nextUp(1.0), Math.nextDown(1.0), 0.1, 0.2, 0.1 + 0.2, 1e15 - 1, 1e15 + 1,
            9007199254740993.0, (double) Long.MAX_VALUE, (double) Long.MIN_VALUE, 2.2250738585072012e-308};
        for (double v : edges) assertRoundTrips(v);
        assertEquals("-0", JsonWriter.format(-0.0));
        assertEquals("0", JsonWriter.format(0.0));
    }

    @Test
    void everyDoubleRoundTripsProperty() {
        Random random = new Random(20261202L);
        for (int i = 0; i < 10_000; i++) {
            double v = Double.longBitsToDouble(random.nextLong()); // all exponents, subnormals included
            if (Double.isFinite(v)) assertRoundTrips(v);
            double subnormal = Double.longBitsToDouble(random.nextLong() & 0x800F_FFFF_FFFF_FFFFL);
            assertRoundTrips(subnormal);
            double everyday = (random.nextDouble() - 0.5) * Math.pow(10, random.nextInt(12) - 3);
            assertRoundTrips(everyday);
            // values rounded for display, as the published streams and messages round them
            assertRoundTrips(Math.round(everyday * 100.0) / 100.0);
            assertRoundTrips(Math.round(everyday * 10.0) / 10.0);
        }
    }

    @Test
    void notFiniteIsNull() {
        String json = new JsonWriter().field("a", Double.NaN).field("b", Double.POSITIVE_INFINITY)
                .beginArray("c").value(Double.NEGATIVE_INFINITY).value(1.5).end().toString();
        assertEquals("{\"a\":null,\"b\":null,\"c\":[null,1.5]}", json);
    }

    @Test
    void everydayNumbersKeepTheirShortForm() {
        assertEquals("{\"thi\":72,\"t\":21.5,\"big\":1.0E20,\"small\":1.0E-10,\"n\":-3}",
                new JsonWriter().field("thi", 72.0).field("t", 21.5).field("big", 1e20).field("small", 1e-10).field("n", -3L).toString());
    }

    @Test
    void arraysAndNestedObjects() {
        JsonWriter w = new JsonWriter().field("site", "larkmoor").field("channels", List.of("night-phone", "office"))
                .field("none", List.of()).beginObject("zones").beginObject("calf-pen-1").field("thi", 71.5).end()
                .beginObject("hutches").end().end().beginArray("alerts");
        w.beginObject().field("watch", "heat-stress").field("told", List.of("a\"b")).end();
        w.beginObject().end().value("x").value(3L).beginArray().end();
        String json = w.end().toString();
        assertEquals("{\"site\":\"larkmoor\",\"channels\":[\"night-phone\",\"office\"],\"none\":[],"
                + "\"zones\":{\"calf-pen-1\":{\"thi\":71.5},\"hutches\":{}},"
                + "\"alerts\":[{\"watch\":\"heat-stress\",\"told\":[\"a\\\"b\"]},{},\"x\",3,[]]}", json);
        // byre's reader agrees about the structure
        assertEquals("larkmoor", ((Map<?, ?>) Json.parse(json)).get("site"));
        assertEquals(List.of("night-phone", "office"), ((Map<?, ?>) Json.parse(json)).get("channels"));
    }

    @Test
    void aTopLevelArray() {
        JsonWriter w = JsonWriter.array();
        assertEquals("[]", w.toString());
        List<String> items = new ArrayList<>();
        items.add(null);
        items.add("calves");
        assertEquals("[{\"told\":[null,\"calves\"]}]", JsonWriter.array().beginObject().field("told", items).end().toString());
    }

    @Test
    void misuseIsRefused() {
        assertThrows(IllegalStateException.class, () -> new JsonWriter().value("x"));
        assertThrows(IllegalStateException.class, () -> JsonWriter.array().field("k", "v"));
        assertThrows(IllegalStateException.class, () -> new JsonWriter().end());
        assertThrows(IllegalStateException.class, () -> new JsonWriter().beginArray("open").toString());
    }

    @Test
    void controlCharactersAreEscaped() {
        assertEquals("{\"m\":\"a\\nb\\u0001\\\\\"}", new JsonWriter().field("m", "a\nb\u0001\\").toString());
    }
}
