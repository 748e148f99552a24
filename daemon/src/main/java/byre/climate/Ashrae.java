package byre.climate;

/**
 * Moist-air relations of the ASHRAE Handbook - Fundamentals 2017, ch. 1 (the equations PsychroLib
 * implements): Hyland-Wexler saturation pressure (eqs. 5, 6), standard-atmosphere pressure (eq. 3),
 * humidity ratio (eq. 20), moist-air enthalpy (eq. 30) and humidity ratio from the thermodynamic
 * wet bulb (eqs. 33, 35). Pressures in kPa, humidity ratio in kg/kg unless the name says g/kg.
 *
 * <p>byre's zone streams use eqs. 3, 20 and 30 (pressure, humidity ratio, enthalpy) with the
 * vapour pressure from the WMO psychrometer. The Hyland-Wexler saturation and eqs. 33/35 are here
 * as the ASHRAE method family: checked against PsychroLib, and available where an ASHRAE figure is
 * wanted. Like ASHRAE/PsychroLib, {@link #saturationKPa} switches to ice at the triple point (0.01 C),
 * so RH from it is with respect to ice below freezing; {@link #saturationOverWaterKPa} is not.
 */
public final class Ashrae {
    private Ashrae() {}

    /** Ratio of the molar masses of water vapour and dry air used by ASHRAE 2017. */
    public static final double EPSILON = 0.621945;
    /** Standard sea-level pressure, kPa. */
    public static final double SEA_LEVEL_KPA = 101.325;
    static final double TRIPLE_POINT_C = 0.01;
    static final int MAX_ITERATIONS = 50;

    /** Standard-atmosphere station pressure at an elevation (eq. 3), kPa. */
    public static double standardPressureKPa(double elevationM) {
        return SEA_LEVEL_KPA * Math.pow(1.0 - 2.25577e-5 * elevationM, 5.2559);
    }

    /** Hyland-Wexler saturation pressure, over ice at or below 0.01 C, over water above (eqs. 5, 6), kPa. */
    public static double saturationKPa(double tC) {
        return tC <= TRIPLE_POINT_C ? overIceKPa(tC) : saturationOverWaterKPa(tC);
    }

    /** Hyland-Wexler saturation pressure over water at any temperature (eq. 6), kPa. */
    public static double saturationOverWaterKPa(double tC) {
        double t = tC + 273.15;
        double ln = -5.8002206e3 / t + 1.3914993 - 4.8640239e-2 * t + 4.1764768e-5 * t * t
                - 1.4452093e-8 * t * t * t + 6.5459673 * Math.log(t);
        return Math.exp(ln) / 1000.0;
    }

    static double overIceKPa(double tC) {
        double t = tC + 273.15;
        double ln = -5.6745359e3 / t + 6.3925247 - 9.677843e-3 * t + 6.2215701e-7 * t * t
                + 2.0747825e-9 * t * t * t - 9.484024e-13 * t * t * t * t + 4.1635019 * Math.log(t);
        return Math.exp(ln) / 1000.0;
    }

    /** Humidity ratio from vapour pressure and total pressure (eq. 20), kg/kg dry air. */
    public static double humidityRatio(double vapourKPa, double pressureKPa) {
        return EPSILON * vapourKPa / (pressureKPa - vapourKPa);
    }

    /** Vapour pressure from humidity ratio (inverse of eq. 20), kPa. */
    public static double vapourPressureKPa(double humidityRatio, double pressureKPa) {
        return pressureKPa * humidityRatio / (EPSILON + humidityRatio);
    }

    /** Moist-air enthalpy (eq. 30), kJ/kg dry air; humidity ratio in kg/kg. */
    public static double enthalpyKJPerKg(double tC, double humidityRatio) {
        return 1.006 * tC + humidityRatio * (2501.0 + 1.86 * tC);
    }

    /** Humidity ratio from dry bulb and thermodynamic wet bulb (eqs. 33 water, 35 ice), kg/kg. */
    public static double humidityRatioFromWetBulb(double tC, double twC, double pressureKPa) {
        double wsStar = humidityRatio(saturationKPa(twC), pressureKPa);
        if (twC >= 0) {
            return ((2501.0 - 2.326 * twC) * wsStar - 1.006 * (tC - twC)) / (2501.0 + 1.86 * tC - 4.186 * twC);
        }
        return ((2830.0 - 0.24 * twC) * wsStar - 1.006 * (tC - twC)) / (2830.0 + 1.86 * tC - 2.1 * twC);
    }

    /**
     * Dew point (frost point at or below 0.01 C, as ASHRAE/PsychroLib) of a vapour pressure: Newton on
     * ln p_ws with a numerical slope, at most {@value #MAX_ITERATIONS} steps; NaN when not positive.
     */
    public static double dewPointC(double vapourKPa) {
        if (!(vapourKPa > 0)) return Double.NaN;
        double target = Math.log(vapourKPa);
        double t = Magnus.dewPointC(vapourKPa, SEA_LEVEL_KPA); // close first guess
        for (int i = 0; i < MAX_ITERATIONS; i++) {
            double h = 1e-3;
            double f = Math.log(saturationKPa(t)) - target;
            double slope = (Math.log(saturationKPa(t + h)) - Math.log(saturationKPa(t - h))) / (2 * h);
            double next = Math.max(-100, Math.min(200, t - f / slope));
            if (Math.abs(next - t) < 1e-6) return next;
            t = next;
        }
        return t;
    }
}
