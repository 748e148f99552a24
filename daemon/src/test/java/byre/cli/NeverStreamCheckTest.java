package byre.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** {@code byre check} refuses a watch on a stream the zone can never have, and says which sensor it lacks. */
class NeverStreamCheckTest {
    @TempDir
    Path dir;

    Path config(String thi) throws Exception {
        return Files.writeString(dir.resolve("byre.yaml"), """
                site: larkmoor
                sensors:
                  shed-dry: { topic: t/dry, quantity: dry-bulb }
                  shed-rh: { topic: t/rh, quantity: rh }
                zones:
                  cow-shed: { groups: [cows], sensors: [shed-dry, shed-rh], thi: %s }
                notify:
                  office: { type: command, argv: [/bin/true] }
                rules: rules.d
                history: { path: history.db }
                """.formatted(thi));
    }

    CliRun check(String thi, String rules) throws Exception {
        Path cfg = config(thi);
        Path file = Files.writeString(dir.resolve("shed.rules"), rules);
        return CliRun.of("check", "--config", cfg.toString(), file.toString());
    }

    @Test
    void cciWithoutAnAirSpeedSensorIsAnError() throws Exception {
        CliRun r = check("nrc-1971", "watch hot\n  raise when cow-shed.cci > 30 C\n  clear when cow-shed.cci < 28 C\n  notify office\n");
        assertEquals(Main.USAGE, r.code(), r.err());
        assertTrue(r.err().contains("shed.rules:2:23: cow-shed has no air-speed sensor; cci needs dry-bulb, wet-bulb or rh or dew-point,"
                + " air-speed"), r.err());
    }

    @Test
    void thiByTheWindAdjustedFormWithoutAnAirSpeedSensorIsAnError() throws Exception {
        String rules = "watch heat\n  raise when cow-shed.thi >= 72 for 30m\n  clear when cow-shed.thi <= 70 for 20m\n  notify office\n";
        CliRun adjusted = check("mader-2006-adjusted", rules);
        assertEquals(Main.USAGE, adjusted.code(), adjusted.err());
        assertTrue(adjusted.err().contains("shed.rules:2:23: cow-shed has no air-speed sensor; thi (mader-2006-adjusted) needs dry-bulb,"
                + " wet-bulb or rh or dew-point, air-speed"), adjusted.err());

        CliRun plain = check("mader-2006", rules);
        assertEquals(Main.OK, plain.code(), plain.err());
    }

    @Test
    void aGroupSkipsTheZoneAndSaysWhy() throws Exception {
        CliRun r = check("nrc-1971", "watch chill\n  raise when @cows.wind-chill < 5 C\n  clear when @cows.wind-chill > 7 C\n  notify office\n");
        assertEquals(Main.USAGE, r.code(), "no zone of the group can have the stream");
        assertTrue(r.err().contains("zone 'cow-shed' matched by '@cows' has no 'wind-chill' stream; the watch skips it"
                + " (cow-shed has no air-speed sensor; wind-chill needs dry-bulb, air-speed)"), r.err());
    }
}
