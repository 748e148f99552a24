package byre.demo;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/** The simulator's own psychrometry, so that the wet bulbs it publishes mean the humidity it intends. */
class PsychrometerTest {

    /** ASHRAE Handbook Fundamentals 2017 ch. 1 Table 1, as quoted in PsychroLib's tests (within 1 Pa). */
    @ParameterizedTest
    @CsvSource({"-500, 107.478", "0, 101.325", "500, 95.461", "1000, 89.875", "4000, 61.640"})
    void stationPressureFollowsTheStandardAtmosphere(double elevationM, double kPa) {
        assertEquals(kPa, Psychrometer.stationPressureKPa(elevationM), 0.002);
    }

    /** WMO-No. 8 Annex 4.B saturation over water, pure phase (f = 1 removed): 6.1120 hPa at 0 C, 23.326 at 20 C, 42.337 at 30 C. */
    @ParameterizedTest
    @CsvSource({"0, 6.1120", "20, 23.326", "30, 42.337"})
    void saturationMatchesTheWmoMagnusForm(double tC, double hPa) {
        double p = 1013.25;
        double enhancement = 1.0016 + 3.15e-6 * p - 0.074 / p;   // f(1013.25 hPa) = 1.00472
        assertEquals(1.00472, enhancement, 1e-5);
        assertEquals(hPa, Psychrometer.saturationHPa(tC, p) / enhancement, 0.001);
    }

    /**
     * Wet bulb from RH by inverting the WMO Annex 4.B Assmann psychrometer formula at 101325 Pa:
     * check values computed from that formula by bisection; PsychroLib's
     * thermodynamic wet bulb for the same air is within 0.1 K (13.783, 22.380, 9.157, 2.859).
     */
    @ParameterizedTest
    @CsvSource({"20, 50, 13.831", "25, 80, 22.402", "10, 90, 9.163", "5, 70, 2.871", "30, 50, 22.076"})
    void wetBulbInvertsTheWmoPsychrometerFormula(double tC, double rh, double wetC) {
        assertEquals(wetC, Psychrometer.wetBulbC(tC, rh, 101.325), 0.005);
    }

    /** Saturated air: the wet bulb reads the dry bulb (common practice). */
    @ParameterizedTest
    @CsvSource({"3", "15", "28"})
    void saturatedAirHasNoDepression(double tC) {
        assertEquals(tC, Psychrometer.wetBulbC(tC, 100, 99.2), 1e-6);
    }
}
