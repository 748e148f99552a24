package byre.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.config.ByreConfig;
import byre.history.HistoryReader;
import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.io.StringWriter;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.time.Instant;
import java.time.ZoneId;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** {@code byre history}: CSV per RFC 4180 with units in the header, buckets, times, and usage errors. */
class HistoryCommandTest {
    @TempDir
    Path dir;

    private String export(ByreConfig cfg, String zone, String quantity, String sensor, String from, String to, String every,
                          boolean csv) throws Exception {
        HistoryCommand.Query q = HistoryCommand.resolve(cfg, zone, quantity, sensor, from, to, every, PreparedHistory.NOW);
        StringWriter out = new StringWriter();
        try (HistoryReader r = HistoryReader.openReadOnly(cfg.history().path())) {
            HistoryCommand.export(r, q, csv, cfg.timezone(), out, f -> { });
        }
        return out.toString();
    }

    @Test
    void rawCsvHasIsoTimesCrlfAndTheDisplayUnitInTheHeader() throws Exception {
        ByreConfig cfg = PreparedHistory.config(dir, "us");
        PreparedHistory.write(cfg.history().path());
        String csv = export(cfg, "cow-shed", "dry-bulb", null, "-3h", "now", null, true);
        // 25.5 C = 77.9 F, 26 C = 78.8 F, 26.5 C = 79.7 F (F = C * 9/5 + 32, common practice).
        assertEquals("time,dry-bulb (degF)\r\n"
                + "2026-07-14T12:01:00Z,77.9\r\n"
                + "2026-07-14T13:01:00Z,78.8\r\n"
                + "2026-07-14T14:01:00Z,79.7\r\n", csv);
    }

    @Test
    void bucketsGiveMinMaxMeanCountAndAUnitlessIndexHasNoUnit() throws Exception {
        ByreConfig cfg = PreparedHistory.config(dir, "metric");
        PreparedHistory.write(cfg.history().path());
        String csv = export(cfg, "cow-shed", "thi", null, "2026-07-14T00:00:00Z", "2026-07-14T04:00:00Z", "2h", true);
        // Hourly THI 69 (00:01), 70, 71, 72 (03:01): two 2-hour buckets.
        assertEquals("time,thi min,thi max,thi mean,count\r\n"
                + "2026-07-14T00:00:00Z,69,70,69.5,2\r\n"
                + "2026-07-14T02:00:00Z,71,72,71.5,2\r\n", csv);
    }

    @Test
    void sensorStreamsAndSiteLocalTimesInTheTable() throws Exception {
        ByreConfig cfg = PreparedHistory.config(dir, "metric");
        PreparedHistory.write(cfg.history().path());
        // 2026-07-14T15:00 in London (BST, +01:00) is 14:00 UTC; the 14:01 UTC reading shows as 15:01:00 local.
        String table = export(cfg, null, null, "shed-rh", "2026-07-14T15:00", "now", null, false);
        assertEquals(List.of("time (Europe/London)  shed-rh (%)", "2026-07-14 15:01:00 70"),
                table.lines().map(l -> l.strip().replaceAll(" {2,}", "  ").replaceAll("(\\d) +(\\d+)$", "$1 $2")).toList());
    }

    @Test
    void csvFieldsAreQuotedOnlyWhenNeeded() {
        assertEquals("plain", Csv.field("plain"));
        assertEquals("\"a,b\"", Csv.field("a,b"));
        assertEquals("\"say \"\"hi\"\"\"", Csv.field("say \"hi\""));
        assertEquals("\"two\nlines\"", Csv.field("two\nlines"));
        assertEquals("a,\"b,c\"\r\n", Csv.row("a", "b,c"));
    }

    @Test
    void timesAcceptNowRelativeIsoAndSiteLocalForms() {
        ZoneId london = ZoneId.of("Europe/London");
        Instant now = PreparedHistory.NOW;
        assertEquals(now, TimeArg.parse("now", now, london).orElseThrow());
        assertEquals(now.minusSeconds(86_400), TimeArg.parse("-24h", now, london).orElseThrow());
        assertEquals(Instant.parse("2026-07-14T13:05:00Z"), TimeArg.parse("2026-07-14T13:05:00Z", now, london).orElseThrow());
        assertEquals(Instant.parse("2026-07-13T23:00:00Z"), TimeArg.parse("2026-07-14", now, london).orElseThrow());
        assertTrue(TimeArg.parse("yesterday", now, london).isEmpty());
    }

    @Test
    void unknownZoneOrQuantityIsAUsageErrorWithADidYouMean() throws Exception {
        ByreConfig cfg = PreparedHistory.config(dir, "metric");
        HistoryCommand.BadQuery z = assertThrows(HistoryCommand.BadQuery.class,
                () -> HistoryCommand.resolve(cfg, "cow-shd", "thi", null, "-1h", "now", null, PreparedHistory.NOW));
        assertTrue(z.getMessage().contains("unknown zone 'cow-shd'") && z.getMessage().contains("cow-shed"), z.getMessage());
        HistoryCommand.BadQuery q = assertThrows(HistoryCommand.BadQuery.class,
                () -> HistoryCommand.resolve(cfg, "cow-shed", "wind-chil", null, "-1h", "now", null, PreparedHistory.NOW));
        assertTrue(q.getMessage().contains("wind-chill"), q.getMessage());

        // Through the command line: exit code 2 and the message on standard error.
        PreparedHistory.write(cfg.history().path());
        PrintStream err = System.err;
        ByteArrayOutputStream buf = new ByteArrayOutputStream();
        System.setErr(new PrintStream(buf, true, StandardCharsets.UTF_8));
        int code;
        try {
            code = Main.execute("history", "--config", dir.resolve("byre.yaml").toString(), "--zone", "cow-shed", "--quantity", "thy",
                    "--from", "-24h");
        } finally {
            System.setErr(err);
        }
        assertEquals(Main.USAGE, code);
        assertTrue(buf.toString(StandardCharsets.UTF_8).contains("did you mean"), buf.toString(StandardCharsets.UTF_8));
    }
}
