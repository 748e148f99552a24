package byre.alerts;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.time.Duration;
import java.time.Instant;
import java.time.LocalTime;
import java.time.ZoneId;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

class DigestBuilderTest {
    static final ZoneId LONDON = ZoneId.of("Europe/London");

    @Test
    void rendersANightInShortLines() {
        Map<String, double[]> ext = new LinkedHashMap<>();
        ext.put("wind-chill", new double[] {1.84, 6.2});
        ext.put("thi", new double[] {44.0, 51.26});
        Map<String, Duration> thi = new LinkedHashMap<>();
        thi.put("normal", Duration.ofMinutes(720));
        thi.put("alert", Duration.ZERO);
        NightDigest n = new NightDigest(Instant.parse("2026-01-19T19:00:00Z"), Instant.parse("2026-01-20T07:00:00Z"),
                List.of(new NightDigest.ZoneNight("calf-pen-1", ext, Map.of("wind-chill", "C"), thi)),
                List.of(new NightDigest.IncidentSpan("calf-chill", "calf-pen-1", "critical", Instant.parse("2026-01-20T02:10:00Z"),
                        Instant.parse("2026-01-20T04:35:00Z")),
                        new NightDigest.IncidentSpan("quiet-sensor", "cow-shed", "warning", Instant.parse("2026-01-20T06:00:00Z"), null)),
                List.of("shed-rh"));
        assertEquals("""
                Night at larkmoor, 19:00-07:00

                calf-pen-1
                  wind-chill 1.8 C to 6.2 C
                  THI 44.0 to 51.3
                  THI bands: normal 12 h

                Alerts (2):
                  calf-chill calf-pen-1 (critical) 02:10-04:35, 2 h 25 min
                  quiet-sensor cow-shed (warning) 06:00, still open
                Silent sensors: shed-rh
                """, DigestBuilder.render("larkmoor", n, LONDON));
    }

    @Test
    void nextRunFollowsTheSiteClockThroughSummerTime() {
        // July in London is BST (UTC+1): 07:00 local = 06:00Z (common practice: UK summer time)
        assertEquals(Instant.parse("2026-07-14T06:00:00Z"), DigestBuilder.nextRun(Instant.parse("2026-07-13T06:00:00Z"), LocalTime.of(7, 0), LONDON));
        assertEquals(Instant.parse("2026-07-15T06:00:00Z"), DigestBuilder.nextRun(Instant.parse("2026-07-14T06:00:00Z"), LocalTime.of(7, 0), LONDON));
        // clocks go forward at 01:00Z on Sunday 29 March 2026: 01:30 local does not exist and becomes 02:30 BST = 01:30Z
        assertEquals(Instant.parse("2026-03-29T01:30:00Z"), DigestBuilder.nextRun(Instant.parse("2026-03-28T12:00:00Z"), LocalTime.of(1, 30), LONDON));
        // the day after, 01:30 BST = 00:30Z
        assertEquals(Instant.parse("2026-03-30T00:30:00Z"), DigestBuilder.nextRun(Instant.parse("2026-03-29T01:30:00Z"), LocalTime.of(1, 30), LONDON));
    }
}
