package byre.climate;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/** THI forms, THI categories, CCI and BGHI against their sources' values. */
class CattleIndexTest {

    // NRC 1971 THI: rOpenSci agroclimatico documents ith(23, 65) = 70.4355.
    @Test
    void nrcPublishedExample() {
        assertEquals(70.4355, Thi.nrc1971(23, 65), 0.0001);
    }

    // De Vries (extension.org): "THI 72 corresponds to 72 F at 100 %, 77 F at 50 %, 82 F at 20 % RH" (rounded F).
    @ParameterizedTest
    @CsvSource({"72,100", "77,50", "82,20"})
    void deVriesThi72(double tF, double rh) {
        assertEquals(72, Thi.nrc1971((tF - 32) / 1.8, rh), 0.6);
    }

    // Australian dairy guidance: "THI 78 occurs at 31 C/40 % or 27 C/80 %".
    @ParameterizedTest
    @CsvSource({"31,40", "27,80"})
    void australianThi78(double t, double rh) {
        assertEquals(78, Thi.nrc1971(t, rh), 0.15);
    }

    // Check values computed from the published forms cited in ThiVariant (Tw and Td from PsychroLib).
    @ParameterizedTest
    @CsvSource({
            "23,65,70.44,70.39,70.45,69.99,18.46,16.07", "25,50,71.78,71.70,71.48,71.19,17.89,13.86",
            "28,60,77.03,76.96,76.65,76.23,22.07,19.51", "30,40,76.76,76.64,76.65,76.58,20.06,14.94",
            "27,80,78.11,78.08,77.51,76.57,24.26,23.25", "35,60,86.86,86.76,86.09,85.58,28.17,26.07",
            "20,90,67.45,67.44,68.58,67.79,18.86,18.31"})
    void thiForms(double t, double rh, double nrc, double mader, double thom, double dew, double tw, double td) {
        assertEquals(nrc, Thi.nrc1971(t, rh), 0.006);
        assertEquals(mader, Thi.mader2006(t, rh), 0.006);
        assertEquals(thom, Thi.thomWetBulb(t, tw), 0.015); // Tw, Td given to 0.01 K
        assertEquals(dew, Thi.dewPointForm(t, td), 0.015);
    }

    // Mader et al. 2006 adjusted THI (J. Anim. Sci. 84:712-719), evaluated from its published form.
    @ParameterizedTest
    @CsvSource({"30,50,1,500,84.12", "30,50,0,0,82.71", "30,50,3,0,76.73", "35,40,4,900,85.30"})
    void maderAdjusted(double t, double rh, double ws, double rad, double thi) {
        assertEquals(thi, Thi.mader2006Adjusted(t, rh, ws, rad), 0.006);
    }

    // LWSI bands (Harrington & Bowles 2002; agroclimatico): normal < 75, alert 75-78, danger 79-83, emergency >= 84.
    // Dairy bands (Zimbelman et al. 2009; Zimbelman & Collier chart): 68 onset, 72, 80, 90.
    @ParameterizedTest
    @CsvSource({"74.9,normal,mild-moderate", "71.9,normal,stress threshold", "75,alert,mild-moderate", "78.9,alert,mild-moderate",
            "79,danger,mild-moderate", "84,emergency,moderate-severe", "67.9,normal,no stress",
            "68,normal,stress threshold", "90,emergency,severe"})
    void categories(double thi, String lwsi, String dairy) {
        assertEquals(lwsi, ThiScale.LWSI.category(thi));
        assertEquals(dairy, ThiScale.DAIRY.category(thi));
    }

    // CCI (Mader, Johnson & Gaughan 2010): the paper's worked example 30 C, 50 %, 1 m/s, 500 W/m2 -> 37.9
    // (as reported by a cattle-index library that checked it against the paper).
    @Test
    void cciWorkedExample() {
        assertEquals(37.9, Cci.celsius(30, 50, 1, 500), 0.05);
    }

    // Mader, Johnson & Gaughan 2010 (J. Anim. Sci. 88:2153-2165), the same formula evaluated at more points
    // (reading (C) of the wind term).
    @ParameterizedTest
    @CsvSource({"30,50,2,0,30.43", "30,50,2,800,37.30", "35,60,1,900,48.92", "25,40,3,500,26.04",
            "20,50,1,0,21.38", "30,30,0,0,34.33", "0,80,5,0,-9.94", "-10,80,10,0,-23.95", "-20,70,5,100,-31.35"})
    void cciValues(double t, double rh, double ws, double rad, double cci) {
        assertEquals(cci, Cci.celsius(t, rh, ws, rad), 0.006);
    }

    @ParameterizedTest
    @CsvSource({"0,3.33", "0.5,2.42", "1,0.59", "2,-2.41", "3,-4.34", "5,-6.51", "10,-8.76", "15,-9.97", "20,-11.10"})
    void cciWindTermFallsSmoothly(double ws, double term) {
        assertEquals(term, Cci.windTerm(ws), 0.006);
    }

    // BGHI, Buffington et al. 1981: Tbg + 0.36 Tdp + 41.5 (formula evaluated).
    @ParameterizedTest
    @CsvSource({"30,20,78.70", "35,18,82.98", "40,22,89.42", "25,15,71.90"})
    void bghi(double globe, double td, double expected) {
        assertEquals(expected, Bghi.index(globe, td), 0.001);
    }
}
