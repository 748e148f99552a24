package byre.climate;

/**
 * Comprehensive Climate Index of Mader, Johnson and Gaughan 2010 (J. Anim. Sci. 88:2153-2165,
 * erratum 2011, 89:2955): air temperature corrected for humidity, wind and solar radiation, degC.
 * The wind term is read as log base 0.3 of (2.26 WS + 0.33)^-2, the only reading that gives a smooth
 * falling correction and that reproduces the paper's worked example (30 C, 50 %, 1 m/s, 500 W/m2 ->
 * 37.9). Stated for about -30..45 C.
 */
public final class Cci {
    private Cci() {}

    public static final double MIN_C = -30, MAX_C = 45;
    private static final double LN_03 = Math.log(0.3);

    public static double celsius(double tC, double rhPercent, double windMps, double solarWm2) {
        return tC + humidityTerm(tC, rhPercent) + windTerm(windMps) + solarTerm(tC, solarWm2);
    }

    static double humidityTerm(double tC, double rh) {
        return Math.exp(0.00182 * rh + 1.8e-5 * tC * rh) * (0.000054 * tC * tC + 0.00192 * tC - 0.0246) * (rh - 30);
    }

    static double windTerm(double ws) {
        double a = Math.pow(1.0 / (2.26 * ws + 0.23), 0.45);
        double logTerm = -2.0 * Math.log(2.26 * ws + 0.33) / LN_03;
        double b = 2.9 + 1.14e-6 * Math.pow(ws, 2.5) - logTerm;
        return -6.56 / Math.exp(a * b) - 0.00566 * ws * ws + 3.33;
    }

    static double solarTerm(double tC, double rad) {
        return 0.0076 * rad - 0.00002 * rad * tC + 0.00005 * tC * tC * Math.sqrt(rad) + 0.1 * tC - 2;
    }
}
