package byre.climate;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/** Saturation, psychrometer, pressure and dew-point check values; the source is named at each table. */
class SaturationAndPsychrometerTest {

    // WMO-No. 8 Annex 4.B Magnus, pure phase: check values computed from the Annex coefficients
    // (as reproduced in secondary copies of the Annex).
    @ParameterizedTest
    @CsvSource({"-20,1.2597,1.0326", "-10,2.8703,2.5987", "0,6.1120,6.1120"})
    void wmoMagnusWaterAndIce(double t, double ewHPa, double eiHPa) {
        assertEquals(ewHPa, Magnus.overWaterKPa(t) * 10, 0.0005);
        assertEquals(eiHPa, Magnus.overIceKPa(t) * 10, 0.0005);
    }

    @ParameterizedTest
    @CsvSource({"20,23.326", "25,31.601", "30,42.337", "40,73.675"})
    void wmoMagnusWarm(double t, double ewHPa) {
        assertEquals(ewHPa, Magnus.overWaterKPa(t) * 10, 0.001);
    }

    // WMO-No. 8 eq. 4.B.5 enhancement factor, evaluated.
    @ParameterizedTest
    @CsvSource({"101.325,1.00472", "84.56,1.00418", "70.0,1.00370"})
    void wmoEnhancementFactor(double pKPa, double f) {
        assertEquals(f, Magnus.enhancement(pKPa), 0.00001);
    }

    // ASHRAE Handbook - Fundamentals 2017 ch. 1 Table 3, as quoted by PsychroLib's test suite;
    // ASHRAE states its equations within 300 ppm of the table.
    @ParameterizedTest
    @CsvSource({"-20,103.24", "-5,401.74", "5,872.6", "25,3169.7", "50,12351.3", "100,101418.0", "150,476101.4"})
    void ashraeTable3(double t, double pa) {
        assertEquals(pa, Ashrae.saturationKPa(t) * 1000, pa * 3e-4);
    }

    @org.junit.jupiter.api.Test
    void ashraeTable3AtMinus60() {
        assertEquals(1.08, Ashrae.saturationKPa(-60) * 1000, 0.01);
    }

    // ASHRAE 2017 ch. 1 Table 1 via PsychroLib's tests (within 1 Pa): standard-atmosphere pressure (eq. 3).
    @ParameterizedTest
    @CsvSource({"-500,107.478", "0,101.325", "500,95.461", "1000,89.875", "4000,61.640", "10000,26.436"})
    void ashraeStandardAtmosphere(double z, double kPa) {
        assertEquals(kPa, Ashrae.standardPressureKPa(z), 0.001);
    }

    // ASHRAE 2017 ch. 1 Example 1 (via PsychroLib's test): 40 C / 20 C at 101.325 kPa gives W 0.0065, h 56.7 kJ/kg
    // (PsychroLib's own 0.00640 / 56.72 shows the Handbook's rounding).
    @org.junit.jupiter.api.Test
    void ashraeExample1() {
        double w = Ashrae.humidityRatioFromWetBulb(40, 20, 101.325);
        assertEquals(0.0065, w, 0.0001);
        assertEquals(56.7, Ashrae.enthalpyKJPerKg(40, w), 0.1);
    }

    // PsychroLib worked values ("computed with Excel" by its authors): ASHRAE Handbook 2017 ch. 1 Example 1.
    @org.junit.jupiter.api.Test
    void psychrolibWorkedValues() {
        assertEquals(0.0192281274, Ashrae.humidityRatioFromWetBulb(30, 25, 95.461), 0.0192281274 * 3e-4);
        assertEquals(0.00120399820, Ashrae.humidityRatioFromWetBulb(-1, -5, 95.461), 0.0012039982 * 3e-4);
        assertEquals(0.0213603998, Ashrae.humidityRatio(3.1697, 95.461), 1e-9);
        assertEquals(81.316, Ashrae.enthalpyKJPerKg(30, 0.02), 0.001);
    }

    // WMO-No. 8 Annex 4.B psychrometer, aspirated (computed from the Annex form)
    // and FAO-56 naturally ventilated coefficient 8.0e-4 (the same form with A = 8.0e-4).
    @ParameterizedTest
    @CsvSource({
            "5,3,101.325,71.76,68.40", "10,7,101.325,65.41,61.89", "20,15,101.325,58.64,55.66",
            "20,18,101.325,82.53,81.36", "25,20,101.325,63.20,61.05", "25,15,101.325,32.71,28.32",
            "30,25,101.325,66.68,65.11", "30,20,101.325,39.25,36.04", "35,25,101.325,44.29,41.93",
            "35,30,101.325,69.40,68.24", "40,20,101.325,13.45,9.76", "40,30,101.325,48.27,46.51"})
    void wmoPsychrometerSeaLevel(double t, double tw, double p, double rhAspirated, double rhScreen) {
        assertEquals(rhAspirated, Psychrometer.ASPIRATED.relativeHumidity(t, tw, p), 0.02);
        assertEquals(rhScreen, Psychrometer.SCREEN.relativeHumidity(t, tw, p), 0.02);
    }

    @ParameterizedTest
    @CsvSource({"5,3,74.26", "10,7,68.09", "20,15,61.00", "25,20,64.95", "30,20,41.86", "35,25,46.27", "40,20,16.45"})
    void wmoPsychrometerAt1500m(double t, double tw, double rh) {
        assertEquals(rh, Psychrometer.ASPIRATED.relativeHumidity(t, tw, 84.5559), 0.02);
    }

    // Ice-covered bulb, WMO-No. 8 Annex 4.B ice coefficient 5.75e-4, evaluated; RH over water.
    @ParameterizedTest
    @CsvSource({"-2,-3,79.16,0.42003", "-5,-6,73.60,0.31218", "-10,-11,62.62,0.18058", "-10,-10.5,76.50,0.22061"})
    void wmoIceBulb(double t, double ti, double rhWater, double eKPa) {
        assertEquals(eKPa, Psychrometer.ASPIRATED.vapourPressureKPa(t, ti, 101.325), 0.00002);
        assertEquals(rhWater, Psychrometer.ASPIRATED.relativeHumidity(t, ti, 101.325), 0.02);
    }

    // Inverse Magnus dew point (WMO Annex 4.B form), evaluated; 25 C / 80 % -> 21.31 is also
    // PsychroLib's documented example.
    @ParameterizedTest
    @CsvSource({"25,80,21.307", "20,50,9.255", "30,60,21.385", "10,90,8.434", "35,40,19.384", "0,80,-3.040", "25,60,16.693"})
    void dewPointFromRh(double t, double rh, double td) {
        assertEquals(td, Magnus.dewPointFromRhC(t, rh), 0.002);
    }

    @ParameterizedTest
    @CsvSource({"0.2,-14.552", "0.4,-5.774", "1.0,6.920", "2.34,19.975", "3.17,24.974"})
    void dewPointFromVapourPressure(double eKPa, double td) {
        assertEquals(td, Magnus.dewPointC(eKPa, 101.325), 0.002);
    }

    @org.junit.jupiter.api.Test
    void frostPointFromVapourPressure() {
        assertEquals(-12.969, Magnus.frostPointC(0.2, 101.325), 0.002); // inverse Magnus over ice, evaluated
    }

    // Wet bulb from RH by inverting the WMO aspirated psychrometer by bisection, evaluated.
    @ParameterizedTest
    @CsvSource({"20,50,13.831", "30,50,22.076", "25,80,22.402", "35,40,24.038", "40,20,22.202", "10,90,9.163",
            "5,70,2.871", "45,30,28.865"})
    void wetBulbFromRh(double t, double rh, double tw) {
        double e = rh / 100 * Magnus.moistOverWaterKPa(t, 101.325);
        assertEquals(tw, Psychrometer.ASPIRATED.wetBulbC(t, e, 101.325), 0.005);
    }
}
