package byre.demo;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.time.Duration;
import java.time.Instant;
import java.time.LocalTime;
import java.time.ZoneId;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import java.util.function.Predicate;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;
import org.junit.jupiter.api.Test;

class LarkmoorFarmTest {

    private static final ZoneId LONDON = ZoneId.of("Europe/London");

    /**
     * NRC 1971 temperature-humidity index, THI = (1.8 T + 32) - (0.55 - 0.0055 RH)(1.8 T - 26),
     * written here independently of byre; checked below against rOpenSci agroclimatico ith(23, 65) = 70.4355.
     */
    static double thi(double tC, double rhPct) {
        return (1.8 * tC + 32) - (0.55 - 0.0055 * rhPct) * (1.8 * tC - 26);
    }

    /**
     * NWS/MSC 2001 wind chill, metric form WC = 13.12 + 0.6215 T - 11.37 V^0.16 + 0.3965 T V^0.16
     * (T in C, V in km/h), defined for T <= 10 C and V > 4.8 km/h; air temperature outside that
     * (the usual convention). Source: Environment Canada (MSC) wind-chill chart footnotes.
     */
    static double windChillC(double tC, double speedMS) {
        double kmh = speedMS * 3.6;
        if (tC > 10 || kmh <= 4.8) return tC;
        double v = Math.pow(kmh, 0.16);
        return 13.12 + 0.6215 * tC - 11.37 * v + 0.3965 * tC * v;
    }

    @Test
    void theTestsOwnFormulasMatchPublishedValues() {
        assertEquals(70.4355, thi(23, 65), 1e-4);                 // agroclimatico ith(23, 65) doc example
        assertEquals(-19.520, windChillC(-10, 30 / 3.6), 1e-3);  // MSC chart: -10 C, 30 km/h -> -20 (rounded)
        assertEquals(-36.788, windChillC(-25, 20 / 3.6), 1e-3);  // MSC note: -25 C, 20 km/h give -37
        assertEquals(4, Math.round(windChillC(5, 5 / 3.6)));      // MSC chart row 5 C, 5 km/h -> 4
        assertEquals(5.0, windChillC(5, 1.0), 0);                 // calm (<= 4.8 km/h): air temperature
    }

    @Test
    void sameSeedGivesTheSameMessagesAndAnotherSeedDoesNot() {
        List<FeedMessage> a = new LarkmoorFarm(42).run(Duration.ofHours(26));
        List<FeedMessage> b = new LarkmoorFarm(42).run(Duration.ofHours(26));
        List<FeedMessage> c = new LarkmoorFarm(43).run(Duration.ofHours(26));
        assertEquals(a, b);
        assertEquals(a.size(), c.size());
        assertNotEquals(a, c);
    }

    @Test
    void oneReadingPerSensorPerIntervalInTimeOrder() {
        LarkmoorFarm farm = new LarkmoorFarm(7);
        List<FeedMessage> day = farm.run(Duration.ofHours(24));
        int sensors = LarkmoorFarm.sensors().size();
        // 24 h x 60 readings for each sensor, less the 30 silent minutes of one sensor
        assertEquals(24 * 60 * sensors - 30, day.size());
        for (int i = 1; i < day.size(); i++) {
            assertFalse(day.get(i).simTime().isBefore(day.get(i - 1).simTime()), "out of order at " + day.get(i));
        }
        assertEquals(LarkmoorFarm.DEFAULT_START.plus(Duration.ofHours(24)), farm.simTime());

        List<FeedMessage> halfMinutes = new LarkmoorFarm(7, LarkmoorFarm.DEFAULT_START, Duration.ofSeconds(30))
                .run(Duration.ofHours(1));
        assertEquals(120 * sensors, halfMinutes.size());
    }

    @Test
    void aBadIntervalIsRefusedWithAClearMessage() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> new LarkmoorFarm(1, LarkmoorFarm.DEFAULT_START, Duration.ofMillis(10)));
        assertTrue(e.getMessage().contains("between 1s and 1h"), e.getMessage());
    }

    @ParameterizedTest
    @ValueSource(longs = {1, 2, 3, 20260512})
    void theCowShedHasAHotHumidAfternoon(long seed) {
        TreeMap<Instant, Map<String, Double>> minutes = firstDay(seed);
        Run hot = longestRun(minutes, v -> has(v, "shed-dry", "shed-rh") && thi(v.get("shed-dry"), v.get("shed-rh")) > 72);
        assertTrue(hot.minutes() >= 60, "THI > 72 for only " + hot);
        assertTrue(local(hot.from()).isAfter(LocalTime.of(13, 0)) && local(hot.to()).isBefore(LocalTime.of(18, 0)), hot.toString());
        // humid, not just hot: RH stays above 65 % while THI is high
        for (var e : minutes.subMap(hot.from(), true, hot.to(), true).values()) {
            assertTrue(e.get("shed-rh") > 65, "RH " + e.get("shed-rh"));
        }
        // and it is an event: before noon of the next day and at night THI stays well below 70
        Run cool = longestRun(minutes, v -> has(v, "shed-dry", "shed-rh") && thi(v.get("shed-dry"), v.get("shed-rh")) < 70);
        assertTrue(cool.minutes() >= 16 * 60, cool.toString());
    }

    @ParameterizedTest
    @ValueSource(longs = {1, 2, 3, 20260512})
    void theCalfPensHaveAColdWindyNight(long seed) {
        TreeMap<Instant, Map<String, Double>> minutes = firstDay(seed);
        for (String pen : List.of("pen1", "pen2")) {
            String dry = pen + "-dry", air = pen + "-air";
            Run chill = longestRun(minutes, v -> has(v, dry, air) && windChillC(v.get(dry), v.get(air)) < 5);
            assertTrue(chill.minutes() > 20, pen + " wind chill < 5 C for only " + chill);
            LocalTime from = local(chill.from());
            assertTrue(from.isAfter(LocalTime.of(21, 0)) || from.isBefore(LocalTime.of(6, 0)), chill.toString());
            // the air itself is 2-6 C with 1-3 m/s of wind for a good part of it
            Run raw = longestRun(minutes, v -> has(v, dry, air) && v.get(dry) >= 1.5 && v.get(dry) <= 6.5
                    && v.get(air) >= 1 && v.get(air) <= 3.5);
            assertTrue(raw.minutes() >= 20, pen + " " + raw);
            // and it ends: by 08:00 the pens are back above 7 C wind chill (the demo clear level)
            Map<String, Double> eight = minutes.get(LarkmoorFarm.DEFAULT_START.plus(Duration.ofHours(20)));
            assertTrue(windChillC(eight.get(dry), eight.get(air)) > 7, pen + " at 08:00 " + eight);
        }
    }

    @Test
    void calfPen2AirSpeedFallsSilentForHalfAnHour() {
        List<FeedMessage> day = new LarkmoorFarm(5).run(Duration.ofHours(24));
        List<Instant> times = new ArrayList<>();
        for (FeedMessage m : day) if (m.topic().equals("larkmoor/calf-barn/pen2/air")) times.add(m.simTime());
        Duration longestGap = Duration.ZERO;
        Instant gapStart = null;
        for (int i = 1; i < times.size(); i++) {
            Duration gap = Duration.between(times.get(i - 1), times.get(i));
            if (gap.compareTo(longestGap) > 0) { longestGap = gap; gapStart = times.get(i - 1); }
        }
        // last reading at 17:29:xx, next at 18:00:xx: 31 minutes between readings, 30 missing
        assertEquals(Duration.ofMinutes(31), longestGap);
        assertEquals(LocalTime.of(17, 29), local(gapStart).withSecond(0));
        // every other sensor keeps its one-minute rhythm
        for (SimSensor s : LarkmoorFarm.sensors()) {
            if (s.id().equals("pen2-air")) continue;
            long count = day.stream().filter(m -> m.topic().equals(s.topic())).count();
            assertEquals(24 * 60, count, s.id());
        }
    }

    @ParameterizedTest
    @ValueSource(longs = {1, 2, 3, 20260512})
    void calfPen1WetBulbWickDriesOutAndIsRewetted(long seed) {
        TreeMap<Instant, Map<String, Double>> minutes = firstDay(seed);
        Run dry1 = longestRun(minutes, v -> has(v, "pen1-dry", "pen1-wet") && v.get("pen1-dry") - v.get("pen1-wet") < 0.3);
        assertTrue(dry1.minutes() >= 120, "depression < 0.3 C for only " + dry1);
        assertTrue(local(dry1.from()).isAfter(LocalTime.of(12, 0)) && local(dry1.to()).isBefore(LocalTime.of(19, 1)), dry1.toString());
        // at the start the wick is wet and the depression is that of air at about 60-70 % RH
        Map<String, Double> noon = minutes.firstEntry().getValue();
        double wet = noon.get("pen1-dry") - noon.get("pen1-wet");
        assertTrue(wet > 2.5, noon.toString());
        // it creeps rather than jumps: 90 minutes after drying starts the depression is in between
        Map<String, Double> later = minutes.get(LarkmoorFarm.DEFAULT_START.plus(Duration.ofMinutes(105)));
        double mid = later.get("pen1-dry") - later.get("pen1-wet");
        assertTrue(mid > 0.5 && mid < 0.75 * wet, "depression at 13:45 " + mid + ", at noon " + wet);
        // re-wetted at 19:00
        Map<String, Double> evening = minutes.get(LarkmoorFarm.DEFAULT_START.plus(Duration.ofMinutes(7 * 60 + 30)));
        assertTrue(evening.get("pen1-dry") - evening.get("pen1-wet") > 1.5, evening.toString());
        // the healthy wick in pen 2 never collapses
        Run dry2 = longestRun(minutes, v -> has(v, "pen2-dry", "pen2-wet") && v.get("pen2-dry") - v.get("pen2-wet") < 0.3);
        assertTrue(dry2.minutes() < 5, dry2.toString());
    }

    @Test
    void wetBulbNeverReadsMoreThanANoiseMarginAboveDryBulb() {
        TreeMap<Instant, Map<String, Double>> minutes = firstDay(11);
        for (var e : minutes.entrySet()) {
            Map<String, Double> v = e.getValue();
            for (String pen : List.of("pen1", "pen2")) {
                if (has(v, pen + "-dry", pen + "-wet")) {
                    assertTrue(v.get(pen + "-wet") <= v.get(pen + "-dry") + 0.2, e.toString());
                }
            }
        }
    }

    @Test
    void everyPayloadFormAndUnitIsExercised() {
        List<SimSensor> sensors = LarkmoorFarm.sensors();
        assertTrue(sensors.stream().anyMatch(s -> s.payload().equals("number")));
        assertTrue(sensors.stream().anyMatch(s -> s.payload().equals("json:speed")));
        assertTrue(sensors.stream().anyMatch(s -> s.payload().equals("json:air.speed")));
        assertTrue(sensors.stream().anyMatch(s -> s.payload().equals("senml:rh")));
        assertTrue(sensors.stream().anyMatch(s -> s.unit().equals("F")));
        assertTrue(sensors.stream().anyMatch(s -> s.unit().equals("ft/min") && s.quantity().equals("air-speed")));

        List<FeedMessage> minute = new LarkmoorFarm(9).step();
        assertEquals(sensors.size(), minute.size());
        for (int i = 0; i < sensors.size(); i++) {
            SimSensor s = sensors.get(i);
            FeedMessage m = minute.get(i);
            assertEquals(s.topic(), m.topic());
            String text = m.payloadText();
            switch (s.payload()) {
                case "number":
                    assertTrue(text.matches("-?\\d+\\.\\d+"), text);
                    break;
                case "json:speed":
                    assertTrue(text.matches("\\{\"speed\":\\d+\\.\\d,\"ts\":" + m.simTime().getEpochSecond() + "}"), text);
                    break;
                case "json:air.speed":
                    assertTrue(text.matches("\\{\"air\":\\{\"speed\":\\d+\\.\\d+},\"ts\":" + m.simTime().getEpochSecond() + "}"), text);
                    break;
                case "senml:rh":
                    checkSenml(text, m.simTime());
                    break;
                default:
                    throw new AssertionError(s.payload());
            }
        }
    }

    /**
     * RFC 8428 section 4: a pack is a JSON array of records; bn (base name) and bt (base time, seconds
     * since 1970) apply to the records that follow; name = bn + n; time = bt + t (t absent = 0);
     * u is a unit from the SenML registry ("Cel", "%RH"); v a number.
     */
    private static void checkSenml(String text, Instant at) {
        assertTrue(text.startsWith("[{") && text.endsWith("}]"), text);
        Matcher base = Pattern.compile("\"bn\":\"([^\"]+)\",\"bt\":(\\d+)").matcher(text);
        assertTrue(base.find(), text);
        assertEquals("larkmoor/cow-shed/", base.group(1));
        assertEquals(at.getEpochSecond(), Long.parseLong(base.group(2)));
        Matcher rh = Pattern.compile("\\{\"n\":\"rh\",\"u\":\"%RH\",\"v\":(\\d+\\.\\d)}").matcher(text);
        assertTrue(rh.find(), text);
        double v = Double.parseDouble(rh.group(1));
        assertTrue(v > 20 && v < 100, text);
        assertTrue(text.contains("\"n\":\"temp\",\"u\":\"Cel\""), text);
    }

    @Test
    void unitsAreConvertedTheWayAnOperatorWouldCheckThem() {
        // Both pens follow the same outside air: pen 2 (in F) reads about 0.5 C warmer than pen 1 (in C).
        TreeMap<Instant, Map<String, Double>> minutes = firstDay(4);
        double sum = 0; int n = 0;
        for (Map<String, Double> v : minutes.values()) {
            if (has(v, "pen1-dry", "pen2-dry")) { sum += v.get("pen2-dry") - v.get("pen1-dry"); n++; }
        }
        assertEquals(0.5, sum / n, 0.3);
        // calm afternoon air: ft/min (pen 2) and m/s (pen 1) agree to within the gusts
        Map<String, Double> noon = minutes.firstEntry().getValue();
        assertEquals(noon.get("pen1-air"), noon.get("pen2-air"), 0.3);
    }

    // ---- helpers ----

    static TreeMap<Instant, Map<String, Double>> firstDay(long seed) {
        return Decoded.byMinute(Decoded.decode(new LarkmoorFarm(seed).run(Duration.ofHours(24))));
    }

    static boolean has(Map<String, Double> v, String... sensors) {
        for (String s : sensors) if (!v.containsKey(s)) return false;
        return true;
    }

    static LocalTime local(Instant t) { return LocalTime.ofInstant(t, LONDON); }

    record Run(Instant from, Instant to, long minutes) {
        @Override
        public String toString() { return minutes + " min from " + local(from) + " to " + local(to); }
    }

    /** Longest stretch of consecutive minutes whose snapshot satisfies {@code test}. */
    static Run longestRun(TreeMap<Instant, Map<String, Double>> minutes, Predicate<Map<String, Double>> test) {
        Run best = new Run(Instant.EPOCH, Instant.EPOCH, 0);
        Instant start = null, last = null;
        for (var e : minutes.entrySet()) {
            if (test.test(e.getValue())) {
                if (start == null) start = e.getKey();
                last = e.getKey();
                long len = Duration.between(start, last).toMinutes() + 1;
                if (len > best.minutes()) best = new Run(start, last, len);
            } else {
                start = null;
            }
        }
        return best;
    }
}
