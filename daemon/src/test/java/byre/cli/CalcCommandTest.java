package byre.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import org.junit.jupiter.api.Test;

class CalcCommandTest {

    static CliRun run(String... args) {
        return CliRun.of(args);
    }

    @Test
    void tableNamesEveryQuantityAndWhatIsMissing() {
        CliRun r = run("calc", "--dry-bulb", "86F", "--wet-bulb", "75F", "--elevation", "240m");
        assertEquals(Main.OK, r.code(), r.err());
        for (byre.units.Quantity q : byre.units.Quantity.values()) {
            if (q.climate()) assertTrue(r.out().contains("\n" + q.id() + " "), q.id() + " in\n" + r.out());
        }
        assertTrue(r.out().contains("wind-chill, cci: need --air-speed"), r.out());
        assertTrue(r.out().contains("bghi: need --globe"), r.out());
        assertTrue(r.out().contains("LWSI: danger"), r.out());
        assertTrue(r.out().contains("98.47  kPa"), r.out()); // ASHRAE eq. 3 at 240 m
    }

    @Test
    void missingInputsFollowTheZonesThiForm() {
        // The wind- and solar-adjusted form (Mader et al. 2006) reads air speed, so without it THI is missing too.
        CliRun r = run("calc", "--dry-bulb", "30C", "--rh", "60", "--thi-variant", "mader-2006-adjusted");
        assertEquals(Main.OK, r.code(), r.err());
        assertTrue(r.out().contains("missing: thi, wind-chill, cci: need --air-speed; bghi: need --globe"), r.out());
        assertTrue(r.out().contains("Mader et al. 2006, wind and solar adjusted"), r.out());
    }

    @Test
    void conventionIsStated() {
        CliRun r = run("calc", "--dry-bulb", "5C", "--rh", "80", "--air-speed", "0.3m/s");
        assertEquals(Main.OK, r.code());
        assertTrue(r.out().contains("equals air temperature (NWS convention)"), r.out());
    }

    @Test
    void jsonIsKeyedByQuantityInCanonicalUnits() {
        CliRun r = run("calc", "--dry-bulb", "86F", "--rh", "60", "--json");
        assertEquals(Main.OK, r.code(), r.err());
        String j = r.out().trim();
        assertTrue(j.startsWith("{\"dry-bulb\":30,"), j);
        assertTrue(j.contains("\"wind-chill\":null"), j);
        assertTrue(j.contains("\"rh\":60,"), j);
        // NRC 1971 THI at 30 C, 60 % (formula of ThiVariant.NRC_1971)
        assertTrue(j.contains("\"thi\":79.84,"), j);
    }

    @Test
    void usUnitsInAndOut() {
        CliRun r = run("calc", "--dry-bulb", "20", "--rh", "50", "--air-speed", "600ft/min", "--pressure", "29.92inHg", "--units", "us");
        assertEquals(Main.OK, r.code(), r.err());
        assertTrue(r.out().contains("20.0  F"), r.out());
        assertTrue(r.out().contains("600  ft/min"), r.out());
    }

    @Test
    void badInputExitsTwoWithAClearMessage() {
        CliRun wet = run("calc", "--dry-bulb", "20C", "--wet-bulb", "22C");
        assertEquals(Main.USAGE, wet.code());
        assertTrue(wet.err().contains("wet bulb 22.00 C is above dry bulb 20.00 C"), wet.err());

        CliRun rh = run("calc", "--dry-bulb", "20C", "--rh", "104");
        assertEquals(Main.USAGE, rh.code());
        assertTrue(rh.err().contains("within 0-100 %"), rh.err());

        CliRun speed = run("calc", "--dry-bulb", "20C", "--rh", "50", "--air-speed", "-1m/s");
        assertEquals(Main.USAGE, speed.code());
        assertTrue(speed.err().contains("cannot be negative"), speed.err());

        CliRun unit = run("calc", "--dry-bulb", "20X", "--rh", "50");
        assertEquals(Main.USAGE, unit.code());
        assertTrue(unit.err().contains("unknown unit 'X'"), unit.err());

        CliRun both = run("calc", "--dry-bulb", "20C", "--rh", "50", "--wet-bulb", "15C");
        assertEquals(Main.USAGE, both.code());

        CliRun none = run("calc", "--rh", "50");
        assertEquals(Main.USAGE, none.code());
    }
}
