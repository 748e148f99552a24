package byre.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Instant;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** {@code byre replay} as an operator uses it: rules + a readings CSV in, events out, in order with times. */
class ReplayCommandTest {
    @TempDir
    Path dir;

    static final String HEAT = """
            watch heat-stress
              raise when cows.thi >= 72 for 30m
              clear when cows.thi <= 70 for 20m
              level warning
              notify night-phone
              remind every 2h
              escalate after 45m to office
              message "Heat stress in {zone}: THI {value}. Check fans and water."
            """;


    static CliRun run(String... args) {
        return CliRun.of(args);
    }

    /** THI 65 rising to 75 by 13:00 UTC, holding until 16:00, falling to 65 by 18:00; a reading a minute. */
    Path afternoon() throws Exception {
        StringBuilder sb = new StringBuilder("time,zone,quantity,value,unit\n");
        Instant t0 = Instant.parse("2026-07-14T10:00:00Z");
        for (int m = 0; m <= 8 * 60; m++) {
            double thi = m < 180 ? 65 + m * 10.0 / 180 : m < 360 ? 75 : 75 - (m - 360) * 10.0 / 120;
            sb.append(t0.plusSeconds(60L * m)).append(",cows,thi,").append(String.format(java.util.Locale.ROOT, "%.2f", thi)).append(",\n");
        }
        Path csv = dir.resolve("july.csv");
        Files.writeString(csv, sb.toString());
        return csv;
    }

    @Test
    void printsTheEventsInOrderWithTheirTimes() throws Exception {
        Path rules = Files.writeString(dir.resolve("heat.rules"), HEAT);
        CliRun r = run("replay", "--rules", rules.toString(), "--readings", afternoon().toString(), "--json");
        assertEquals(0, r.code(), r.err());
        List<String> lines = r.out().lines().toList();
        // THI reaches 72 at 12:06 (65 + 126 * 10/180 = 72.0): raised 30 min later at 12:36.
        assertTrue(lines.get(0).contains("\"event\":\"raised\"") && lines.get(0).contains("\"at\":\"2026-07-14T12:36:00Z\""), lines.get(0));
        // Nobody acknowledges: escalated to the office 45 min after raising.
        assertTrue(lines.get(1).contains("\"event\":\"escalated\"") && lines.get(1).contains("\"at\":\"2026-07-14T13:21:00Z\""), lines.get(1));
        // Reminder every 2 h after the raise.
        assertTrue(lines.get(2).contains("\"event\":\"reminder\"") && lines.get(2).contains("\"at\":\"2026-07-14T14:36:00Z\""), lines.get(2));
        // THI falls to 70 at 16:30 (75 - 30 * 10/120 = 72.5 ... 70 at 17:00): cleared 20 min later.
        String last = lines.get(lines.size() - 1);
        assertTrue(last.contains("\"event\":\"cleared\"") && last.contains("\"at\":\"2026-07-14T17:20:00Z\""), last);
    }

    @Test
    void badReadingsAndRulesAreUsageErrorsWithPositions() throws Exception {
        Path rules = Files.writeString(dir.resolve("heat.rules"), HEAT);
        Path csv = Files.writeString(dir.resolve("bad.csv"), "time,zone,quantity,value,unit\n2026-07-14T10:00:00Z,cows,thj,70,\nyesterday,cows,thi,70,\n");
        CliRun r = run("replay", "--rules", rules.toString(), "--readings", csv.toString());
        assertEquals(Main.USAGE, r.code());
        assertTrue(r.err().contains(csv + ":2:27: unknown quantity 'thj' (did you mean 'thi'?)"), r.err());
        assertTrue(r.err().contains(csv + ":3:1: not a time: 'yesterday'"), r.err());

        Path badRules = Files.writeString(dir.resolve("bad.rules"), "watch w\n  raise when cows.thi >= 72 fr 30m\n");
        CliRun r2 = run("replay", "--rules", badRules.toString(), "--readings", afternoon().toString());
        assertEquals(Main.USAGE, r2.code());
        assertTrue(r2.err().contains("bad.rules:2:"), r2.err());

        assertEquals(Main.USAGE, run("replay", "--rules", rules.toString()).code(), "neither --readings nor --from");
    }

    @Test
    void eachWatchSaysHowMuchOfTheTimeItsTermsHadNoData() throws Exception {
        // THI every 5 minutes from 10:00 to 18:00 with a sensor outage from 12:00 to 14:00; no RH at all.
        StringBuilder sb = new StringBuilder("time,zone,quantity,value,unit\n");
        Instant t0 = Instant.parse("2026-07-14T10:00:00Z");
        for (int m = 0; m <= 8 * 60; m += 5) {
            if (m > 120 && m < 240) continue;
            sb.append(t0.plusSeconds(60L * m)).append(",cows,thi,70,\n");
        }
        Path csv = Files.writeString(dir.resolve("outage.csv"), sb.toString());
        Path rules = Files.writeString(dir.resolve("w.rules"), HEAT + """
                watch humid
                  raise when cows.rh >= 90 for 10m
                  notify night-phone
                """);
        CliRun r = run("replay", "--rules", rules.toString(), "--readings", csv.toString());
        assertEquals(0, r.code(), r.err());
        assertTrue(r.err().contains("byre replay: 0 events from 2 watches."), r.err());
        // Max-age 12m30s (learnt: 2.5 times 5 minutes): the outage leaves 12:12:30 to 14:00 without data,
        // 107.5 of 480 minutes = 22 %.
        assertTrue(r.err().contains("  heat-stress: no data 22 % of the replayed time (most: cows.thi, 22 %)"), r.err());
        assertTrue(r.err().contains("  humid: no data 100 % of the replayed time (cows.rh never reported)"), r.err());
    }

    @Test
    void aMaxAgeTooShortForTheReplayedSensorsIsWarnedAbout() throws Exception {
        Path cfg = Files.writeString(dir.resolve("byre.yaml"), """
                site: larkmoor
                sensors:
                  shed-dry: { topic: t/dry, quantity: dry-bulb }
                  shed-rh: { topic: t/rh, quantity: rh }
                zones:
                  cows: { sensors: [shed-dry, shed-rh], max-age: 5m }
                history: { path: history.db }
                """);
        StringBuilder sb = new StringBuilder("time,sensor,value\n");
        Instant t0 = Instant.parse("2026-07-14T10:00:00Z");
        for (int m = 0; m <= 120; m += 5) {
            sb.append(t0.plusSeconds(60L * m)).append(",shed-dry,31\n");
            sb.append(t0.plusSeconds(60L * m + 2)).append(",shed-rh,70\n");
        }
        Path csv = Files.writeString(dir.resolve("five.csv"), sb.toString());
        Path rules = Files.writeString(dir.resolve("heat.rules"), HEAT.replace("notify night-phone\n", "").replace("  escalate after 45m to office\n", ""));
        CliRun r = run("replay", "--config", cfg.toString(), "--rules", rules.toString(), "--readings", csv.toString());
        assertEquals(0, r.code(), r.err());
        assertTrue(r.err().contains("byre replay: warning: stream cows.dry-bulb (sensor shed-dry) reports every 5m, close to or above the max-age"
                + " of zone cows (5m)"), r.err());
        assertTrue(r.err().contains("byre replay: warning: stream cows.rh (sensor shed-rh) reports every 5m"), r.err());
    }
}
