package byre.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.config.ByreConfig;
import byre.history.HistoryReader;
import java.nio.file.Path;
import java.time.Duration;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** {@code byre status} on a prepared database with a fixed clock, in pipe (plain) and terminal (colour) modes. */
class StatusScreenTest {
    @TempDir
    Path dir;

    private String render(String units, boolean colour) throws Exception {
        ByreConfig cfg = PreparedHistory.config(dir, units);
        PreparedHistory.write(cfg.history().path());
        try (HistoryReader r = HistoryReader.openReadOnly(cfg.history().path())) {
            StatusData data = StatusCommand.gather(cfg, r, PreparedHistory.NOW, StatusData.Daemon.UNREACHABLE, null);
            return StatusScreen.render(cfg, data, PreparedHistory.NOW, colour);
        }
    }

    @Test
    void pipeModeIsPlainTextWithValuesAgesTrendsAlertsAndSilentSensors() throws Exception {
        String out = render("metric", false);
        assertFalse(out.contains("\u001b["), "no escape codes in a pipe:\n" + out);
        // 14:05 UTC is 15:05 BST in London.
        assertTrue(out.startsWith("byre status: larkmoor, 2026-07-14 15:05 BST (metric units)\n"), out);
        assertTrue(out.contains("daemon: not answering on its admin API"), out);
        assertTrue(out.matches("(?s).*\n  dry-bulb +5\\.0 C +2m\\s.*"), out);
        String chill = out.lines().filter(l -> l.startsWith("  wind-chill")).findFirst().orElseThrow();
        assertTrue(chill.matches("  wind-chill +2\\.5 C +20m .*stale"), "20 minutes old with a 5-minute max-age: " + chill);
        // The cow-shed THI rose by one per hour from 60 to 83: the hourly trend climbs from the lowest to the highest block.
        String thiLine = out.lines().filter(l -> l.startsWith("  thi")).findFirst().orElseThrow();
        assertTrue(thiLine.contains("▁") && thiLine.contains("█"), thiLine);
        assertTrue(thiLine.indexOf('▁') < thiLine.indexOf('█'), thiLine);
        assertTrue(thiLine.contains("60.0..83.0"), thiLine);
        // THI 83 falls in the LWSI "danger" band (79-83).
        assertTrue(thiLine.contains("LWSI danger"), thiLine);
        assertTrue(thiLine.contains(" 4m ") && !thiLine.contains("stale"), thiLine);
        assertTrue(out.contains("open alerts (from the database; the daemon is not answering):"), out);
        // the value as the alert's messages word it, and the incident id to acknowledge with
        assertTrue(out.contains("warning  heat-stress in cow-shed: THI 73.4, normal band, open 1 h; not acknowledged; incident i1"), out);
        assertFalse(out.contains("calf-chill"), "a cleared alert is not open:\n" + out);
        assertTrue(out.contains("  pen1-wet (calf-pen-1): last reading 3h ago"), out);
        assertTrue(out.contains("  pen1-air (calf-pen-1): never reported"), out);
        assertFalse(out.contains("pen1-dry (calf"), out);
    }

    @Test
    void terminalModeColoursWhatNeedsALookAndUsUnitsConvert() throws Exception {
        String out = render("us", true);
        assertTrue(out.contains("\u001b[1mcalf-pen-1\u001b[0m"), out);
        assertTrue(out.contains("\u001b[31mpen1-wet\u001b[0m"), "silent sensors in red:\n" + out);
        // 5 C = 41 F (common practice: F = C * 9/5 + 32).
        assertTrue(out.matches("(?s).*\n  dry-bulb +41\\.0 F .*"), out);
        assertTrue(out.contains("(US units)"), out);
    }

    @Test
    void sparklineMapsLowestAndHighestToTheEndBlocksAndGapsToSpaces() {
        // 1.5 of 0..3 is 3.5 of 7 steps, rounded to step 4 (the fifth block).
        assertEquals("▁▅█ ", Sparkline.draw(new double[] {0, 1.5, 3, Double.NaN}));
        assertEquals("▄▄", Sparkline.draw(new double[] {7, 7}));
    }

    @Test
    void agesAreShort() {
        assertEquals(List.of("45s", "12m", "5h", "3d", "future"), List.of(StatusScreen.age(Duration.ofSeconds(45)),
                StatusScreen.age(Duration.ofMinutes(12)), StatusScreen.age(Duration.ofHours(5)), StatusScreen.age(Duration.ofDays(3)),
                StatusScreen.age(Duration.ofMinutes(-3))));
    }
}
