package byre.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Random;
import java.util.function.DoubleUnaryOperator;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The same barn, sampled by sensors reporting every minute and every 5 minutes (±10 s of jitter, as radio
 * and battery sensors do), replayed with {@code byre replay}: the same events, each within one reporting
 * interval (plus the jitter) of the other. The max-age is not written anywhere: it follows the readings.
 */
class ReportingSpacingTest {
    @TempDir
    Path dir;

    static final Instant T0 = Instant.parse("2026-07-14T08:00:00Z");
    static final Duration JITTER = Duration.ofSeconds(10);

    /** One stream of a zone CSV: its value as a function of minutes since T0. */
    record Series(String zone, String quantity, String unit, DoubleUnaryOperator value, double fromMin, double toMin) {}

    /** Ramps between plateaus: (minute, value) corners, linear between them. */
    static DoubleUnaryOperator corners(double... mv) {
        return m -> {
            if (m <= mv[0]) return mv[1];
            for (int i = 2; i < mv.length; i += 2) {
                if (m <= mv[i]) return mv[i - 1] + (mv[i + 1] - mv[i - 1]) * (m - mv[i - 2]) / (mv[i] - mv[i - 2]);
            }
            return mv[mv.length - 1];
        };
    }

    Path csv(String name, List<Series> series, int everyMin, long seed) throws Exception {
        Random jitter = new Random(seed);
        List<String[]> rows = new ArrayList<>();
        for (Series s : series) {
            for (double m = s.fromMin(); m <= s.toMin(); m += everyMin) {
                long ms = Math.round(m * 60_000) + (everyMin == 1 ? 0 : jitter.nextInt((int) JITTER.toMillis() * 2 + 1) - JITTER.toMillis());
                Instant at = T0.plusMillis(ms);
                rows.add(new String[] {at.toString(), s.zone(), s.quantity(),
                        String.format(Locale.ROOT, "%.2f", s.value().applyAsDouble(ms / 60_000.0)), s.unit()});
            }
        }
        rows.sort((a, b) -> Instant.parse(a[0]).compareTo(Instant.parse(b[0])));
        StringBuilder sb = new StringBuilder("time,zone,quantity,value,unit\n");
        for (String[] r : rows) sb.append(String.join(",", r)).append('\n');
        return Files.writeString(dir.resolve(name), sb.toString());
    }

    record Event(String kind, String watch, String zone, Instant at, Instant since) {}

    static final Pattern JSON = Pattern.compile("\"event\":\"(\\w+)\".*\"watch\":\"([^\"]+)\".*\"zone\":\"([^\"]+)\"");

    List<Event> replay(Path rules, Path csv) {
        CliRun r = CliRun.of("replay", "--rules", rules.toString(), "--readings", csv.toString(), "--json");
        assertEquals(Main.OK, r.code(), r.err());
        assertFalse(r.err().contains("warning"), r.err());
        List<Event> out = new ArrayList<>();
        for (String line : r.out().lines().toList()) {
            Matcher m = JSON.matcher(line);
            assertTrue(m.find(), line);
            if (!m.group(1).equals("raised") && !m.group(1).equals("cleared")) continue;
            out.add(new Event(m.group(1), m.group(2), m.group(3), field(line, "at"), field(line, "since")));
        }
        return out;
    }

    static Instant field(String json, String name) {
        Matcher m = Pattern.compile("\"" + name + "\":\"([^\"]+)\"").matcher(json);
        return m.find() ? Instant.parse(m.group(1)) : null;
    }

    void assertSameEvents(String rulesText, List<Series> series) throws Exception {
        Path rules = Files.writeString(dir.resolve("w.rules"), rulesText);
        List<Event> everyMinute = replay(rules, csv("m1.csv", series, 1, 1));
        assertFalse(everyMinute.isEmpty(), "the scenario raises something");
        for (long seed = 1; seed <= 5; seed++) {
            List<Event> everyFive = replay(rules, csv("m5-" + seed + ".csv", series, 5, seed));
            assertEquals(everyMinute.stream().map(e -> e.kind() + " " + e.watch() + "/" + e.zone()).toList(),
                    everyFive.stream().map(e -> e.kind() + " " + e.watch() + "/" + e.zone()).toList(), "seed " + seed);
            for (int i = 0; i < everyMinute.size(); i++) {
                Duration apart = Duration.between(everyMinute.get(i).at(), everyFive.get(i).at()).abs();
                assertTrue(apart.compareTo(Duration.ofMinutes(5).plus(JITTER)) <= 0,
                        "seed " + seed + ": " + everyMinute.get(i) + " vs " + everyFive.get(i) + " (" + apart + " apart)");
            }
        }
    }

    @Test
    void heatByThiWithHoldsAndHysteresis() throws Exception {
        assertSameEvents("""
                watch heat-alert
                  raise when cow-shed.thi >= 75 for 30m
                  clear when cow-shed.thi <= 73 for 30m
                  notify office
                watch heat-danger
                  raise when cow-shed.thi >= 79 for 20m
                  clear when cow-shed.thi <= 77 for 30m
                  notify office
                watch heat-short
                  raise when cow-shed.thi >= 78 for 5m
                  clear when cow-shed.thi <= 76 for 5m
                  notify office
                """, List.of(new Series("cow-shed", "thi", "", corners(0, 66, 180, 81, 300, 81, 480, 66), 0, 600)));
    }

    @Test
    void youngCalfColdOnAThirtyMinuteMean() throws Exception {
        assertSameEvents("""
                watch young-calf-cold
                  raise when avg(calf-pen-1.dry-bulb, 30m) < 10 C for 30m
                  clear when avg(calf-pen-1.dry-bulb, 30m) > 12 C for 30m
                  notify office
                watch calf-draught
                  raise when calf-pen-1.wind-chill < 5 C for 20m
                  clear when calf-pen-1.wind-chill > 7 C for 15m
                  notify office
                """, List.of(new Series("calf-pen-1", "dry-bulb", "C", corners(0, 15, 120, 6, 360, 6, 480, 15), 0, 600),
                new Series("calf-pen-1", "wind-chill", "C", corners(0, 12, 150, 2, 330, 2, 450, 12), 0, 600)));
    }

    @Test
    void aSensorThatFallsSilentFor45Minutes() throws Exception {
        // The raise of a silence waits for the stream's max-age, which follows the interval (2m30s or 12m30s):
        // compared here is what the operator reads, the time of the last reading ({since}) and that it clears.
        Path rules = Files.writeString(dir.resolve("q.rules"), """
                watch quiet-anemometer
                  raise when silent(calf-pen-2.air-speed) for 10m
                  notify office
                """);
        DoubleUnaryOperator air = m -> 1.5;
        List<Series> s = List.of(new Series("calf-pen-2", "air-speed", "m/s", air, 0, 120),
                new Series("calf-pen-2", "air-speed", "m/s", air, 165, 300));
        List<Event> one = replay(rules, csv("q1.csv", s, 1, 1));
        List<Event> five = replay(rules, csv("q5.csv", s, 5, 7));
        assertEquals(List.of("raised", "cleared"), one.stream().map(Event::kind).toList());
        assertEquals(List.of("raised", "cleared"), five.stream().map(Event::kind).toList());
        assertTrue(Duration.between(five.get(0).since(), one.get(0).since()).abs().compareTo(Duration.ofMinutes(5).plus(JITTER)) <= 0,
                one + " vs " + five);
        assertTrue(Duration.between(five.get(1).at(), one.get(1).at()).abs().compareTo(Duration.ofMinutes(5).plus(JITTER)) <= 0,
                one + " vs " + five);
    }
}
