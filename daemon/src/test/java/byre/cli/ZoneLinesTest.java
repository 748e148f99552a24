package byre.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.units.Quantity;
import java.nio.file.Path;
import java.time.Duration;
import java.util.EnumMap;
import java.util.Map;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The demo's zone lines show what matters for the zone at that moment, with the THI band as a band. */
class ZoneLinesTest {
    @TempDir
    Path dir;

    static Map<Quantity, Double> values(double dryBulbC, double rh, double airSpeedMS, double windChillC, double heatIndexC, double thi) {
        Map<Quantity, Double> m = new EnumMap<>(Quantity.class);
        m.put(Quantity.DRY_BULB, dryBulbC);
        m.put(Quantity.RH, rh);
        m.put(Quantity.AIR_SPEED, airSpeedMS);
        m.put(Quantity.WIND_CHILL, windChillC);
        m.put(Quantity.HEAT_INDEX, heatIndexC);
        m.put(Quantity.THI, thi);
        return m;
    }

    ZoneLines lines(String units) throws Exception {
        return new ZoneLines(PreparedHistory.config(dir, units), System.out, Duration.ofHours(1));
    }

    @Test
    void aMildAfternoonShowsNeitherWindChillNorHeatIndex() throws Exception {
        // 19.0 C in calm air: NWS wind chill is the air temperature, and below 80 F (26.7 C) the heat index
        // is the simple formula, close to the air temperature (NWS, Rothfusz 1990): neither adds anything.
        assertEquals("Tue 13:00  cow-shed     air 19.0 C  rh 76.9 %  wind 0.4 m/s  THI 65.1, normal band",
                lines("metric").line("Tue 13:00", "cow-shed", values(19.0, 76.9, 0.4, 19.0, 18.9, 65.1)));
    }

    @Test
    void aColdWindyNightShowsWindChillAndAHotAfternoonTheHeatIndex() throws Exception {
        assertEquals("Wed 02:30  calf-pen-1   air 3.1 C  rh 88.0 %  wind 2.1 m/s  chill 0.4 C  THI 38.2, normal band",
                lines("metric").line("Wed 02:30", "calf-pen-1", values(3.1, 88.0, 2.1, 0.4, 1.2, 38.2)));
        // 27.4 C is above 26.7 C (80 F): the heat index applies. THI 76.3 is in the LWSI alert band (75-78, LCI 1970).
        assertEquals("Tue 15:30  cow-shed     air 27.4 C  rh 72.0 %  wind 1.8 m/s  heat-index 29.1 C  THI 76.3, alert band",
                lines("metric").line("Tue 15:30", "cow-shed", values(27.4, 72.0, 1.8, 27.4, 29.1, 76.3)));
    }

    @Test
    void usUnitsCompareAsShown() throws Exception {
        // 26.0 C = 78.8 F is below 80 F: no heat index; 27.0 C = 80.6 F is above it (F = C * 9/5 + 32, common practice)
        assertEquals("Tue 15:00  cow-shed     air 78.8 F  rh 72.0 %  wind 0.9 mph  THI 74.9, normal band",
                lines("us").line("Tue 15:00", "cow-shed", values(26.0, 72.0, 0.4, 26.0, 26.3, 74.9)));
        assertEquals("Tue 15:10  cow-shed     air 80.6 F  rh 72.0 %  wind 0.9 mph  heat-index 83.1 F  THI 75.6, alert band",
                lines("us").line("Tue 15:10", "cow-shed", values(27.0, 72.0, 0.4, 27.0, 28.4, 75.6)));
    }

    @Test
    void theWholeDayFitsTheDurationByDefault() {
        // 60 s, less 3 s of start-up: 86400 s / 57 s = 1515.8, rounded up
        assertEquals(1516.0, DemoCommand.wholeDaySpeed(Duration.ofSeconds(60)));
        assertEquals(Math.ceil(86400 / 597.0), DemoCommand.wholeDaySpeed(Duration.ofMinutes(10)));
        // never so fast that a sensor's readings meet the daemon's flood limit (50 a second; one reading a simulated minute)
        assertEquals(1800.0, DemoCommand.wholeDaySpeed(Duration.ofSeconds(15)));
        assertTrue(DemoCommand.MAX_DEFAULT_SPEED / 60 < byre.daemon.Daemon.FLOOD_LIMIT_PER_SENSOR);
    }
}
