package byre.climate;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.units.Quantity;
import java.util.List;
import org.junit.jupiter.api.Test;

class ZoneClimateTest {

    @Test
    void fullSetFromDryWetAirSpeedGlobe() {
        DerivedClimate d = ZoneClimate.derive(ClimateInputs.builder().dryBulbC(30).wetBulbC(20).airSpeedMps(1)
                .solarWm2(500).globeC(30).build());
        assertFalse(d.hasProblems());
        for (Quantity q : Quantity.values()) if (q.climate()) assertTrue(d.has(q), q + " missing");
        // WMO Assmann 30/20 at sea level: 39.25 % (WMO-No. 8 Annex 4.B form, evaluated)
        assertEquals(39.25, d.value(Quantity.RH), 0.02);
        assertTrue(d.isDerived(Quantity.RH));
        assertFalse(d.isDerived(Quantity.WET_BULB));
        assertEquals(Thi.nrc1971(30, d.value(Quantity.RH)), d.value(Quantity.THI), 1e-12);
        assertEquals(Cci.celsius(30, d.value(Quantity.RH), 1, 500), d.value(Quantity.CCI), 1e-12);
        assertEquals(30.0, d.value(Quantity.WIND_CHILL), 0); // warm: equals air temperature
        assertTrue(d.hasNote(Note.WIND_CHILL_WARM));
        assertTrue(d.hasNote(Note.PRESSURE_STANDARD));
        assertEquals(Bghi.index(30, d.value(Quantity.DEW_POINT)), d.value(Quantity.BGHI), 1e-12);
    }

    @Test
    void elevationGivesStationPressure() {
        DerivedClimate d = ZoneClimate.derive(ClimateInputs.builder().dryBulbC(20).wetBulbC(15).elevationM(1500).build());
        assertEquals(84.5559, d.value(Quantity.PRESSURE), 0.0005);
        assertEquals(61.00, d.value(Quantity.RH), 0.02); // WMO-No. 8 Annex 4.B form at 1500 m, evaluated
        assertTrue(d.hasNote(Note.PRESSURE_FROM_ELEVATION));
    }

    @Test
    void missingInputsAreNamed() {
        DerivedClimate d = ZoneClimate.derive(ClimateInputs.builder().dryBulbC(30).rhPercent(60).build());
        assertTrue(Double.isNaN(d.value(Quantity.WIND_CHILL)));
        assertEquals(List.of("air-speed"), d.missingInputs(Quantity.WIND_CHILL));
        assertEquals(List.of("air-speed"), d.missingInputs(Quantity.CCI));
        assertEquals(List.of("globe"), d.missingInputs(Quantity.BGHI));
        assertEquals(List.of(), d.missingInputs(Quantity.THI));
        DerivedClimate dryOnly = ZoneClimate.derive(ClimateInputs.builder().dryBulbC(30).build());
        assertEquals(List.of("wet-bulb or rh or dew-point"), dryOnly.missingInputs(Quantity.RH)); // a dew-point sensor gives rh too
    }

    @Test
    void wetBulbAboveDryBulbIsAProblemAndOthersStillRun() {
        DerivedClimate d = ZoneClimate.derive(ClimateInputs.builder().dryBulbC(5).wetBulbC(6).airSpeedMps(3).build());
        assertTrue(d.hasProblems());
        assertTrue(d.problems().get(0).contains("wet bulb 6.00 C is above dry bulb 5.00 C"), d.problems().toString());
        assertFalse(d.has(Quantity.RH));
        assertTrue(d.has(Quantity.WIND_CHILL));
    }

    @Test
    void wetBulbSlightlyAboveIsSaturation() {
        DerivedClimate d = ZoneClimate.derive(ClimateInputs.builder().dryBulbC(5).wetBulbC(5.2).build());
        assertFalse(d.hasProblems());
        assertEquals(100.0, d.value(Quantity.RH), 1e-9);
        assertTrue(d.hasNote(Note.WET_BULB_SLIGHTLY_HIGH));
    }

    @Test
    void rhOutOfRangeAndNegativeAirSpeedAreProblems() {
        DerivedClimate d = ZoneClimate.derive(ClimateInputs.builder().dryBulbC(-5).rhPercent(104).airSpeedMps(-1).build());
        assertEquals(2, d.problems().size());
        assertFalse(d.has(Quantity.RH));
        assertFalse(d.has(Quantity.WIND_CHILL));
        assertTrue(d.has(Quantity.DRY_BULB));
    }

    @Test
    void windChillInTheColdWithPenWind() {
        // 2 m/s in the pen = 10.8 km/h as 10 m wind (x1.5): NWS/MSC formula at -5 C
        DerivedClimate d = ZoneClimate.derive(ClimateInputs.builder().dryBulbC(-5).rhPercent(80).airSpeedMps(2).build());
        assertEquals(WindChill.formulaC(-5, 10.8), d.value(Quantity.WIND_CHILL), 1e-12);
        DerivedClimate calm = ZoneClimate.derive(ClimateInputs.builder().dryBulbC(-5).rhPercent(80).airSpeedMps(0.5).build());
        assertEquals(-5.0, calm.value(Quantity.WIND_CHILL), 0);
        assertTrue(calm.hasNote(Note.WIND_CHILL_CALM));
    }

    @Test
    void iceBulbBelowZero() {
        DerivedClimate d = ZoneClimate.derive(ClimateInputs.builder().dryBulbC(-10).wetBulbC(-11).build());
        assertEquals(62.62, d.value(Quantity.RH), 0.02); // WMO-No. 8 Annex 4.B ice bulb, evaluated; RH over water
        assertTrue(d.hasNote(Note.ICE_BULB));
    }

    @Test
    void screenPsychrometerAndImpossibleReading() {
        DerivedClimate screen = ZoneClimate.derive(ClimateInputs.builder().dryBulbC(20).wetBulbC(15)
                .psychrometer(Psychrometer.SCREEN).build());
        assertEquals(55.66, screen.value(Quantity.RH), 0.02); // FAO-56 a = 8.0e-4 in the WMO form, evaluated
        DerivedClimate impossible = ZoneClimate.derive(ClimateInputs.builder().dryBulbC(40).wetBulbC(10).build());
        assertTrue(impossible.hasProblems());
        assertFalse(impossible.has(Quantity.RH));
    }

    @Test
    void anImpossibleWetBulbFeedsNoIndexAndAnotherHumiditySensorStandsIn() {
        DerivedClimate thom = ZoneClimate.derive(ClimateInputs.builder().dryBulbC(40).wetBulbC(10)
                .thiVariant(ThiVariant.THOM_WET_BULB).build());
        assertTrue(thom.hasProblems());
        assertFalse(thom.has(Quantity.THI), "Thom's THI must not read the faulty wet bulb");
        DerivedClimate withDew = ZoneClimate.derive(ClimateInputs.builder().dryBulbC(40).wetBulbC(10).dewPointC(15).build());
        assertTrue(withDew.hasProblems());
        // e_w(15 C) / e_w(40 C) = 17.02 / 73.68 hPa: computed by hand from the WMO-No. 8 Annex 4.B Magnus form over water.
        assertEquals(23.10, withDew.value(Quantity.RH), 0.05);
        assertTrue(withDew.has(Quantity.THI));
    }
}
