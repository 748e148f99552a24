package byre.climate;

/**
 * Saturation vapour pressure by the Magnus form of WMO-No. 8 (2018), Annex 4.B, eqs. 4.B.1, 4.B.2
 * and 4.B.5, with the enhancement factor f(p) for moist air. Pressures in kPa.
 *
 * <p>byre's zone streams (rh, dew point, psychrometer, wet bulb, vpd) use this form: the WMO defines
 * relative humidity with respect to water at all temperatures, its psychrometer coefficients belong
 * to this form, and its water branch is stated for supercooled water down to -45 C, which the
 * ASHRAE function (ice below 0.01 C) does not give. Versus Hyland-Wexler it differs by at most
 * 0.3 % of the pressure between -40 and 50 C (both evaluated; Hyland-Wexler as in ASHRAE Handbook 2017 ch. 1).
 */
public final class Magnus {
    private Magnus() {}

    /** Stated validity of the water branch, degC (WMO-No. 8 Annex 4.B). */
    public static final double WATER_MIN_C = -45, WATER_MAX_C = 60;

    static final double E0_KPA = 0.6112;
    static final double A_W = 17.62, B_W = 243.12;
    static final double A_I = 22.46, B_I = 272.62;

    /** Pure-phase saturation vapour pressure over plane water (also supercooled), kPa. */
    public static double overWaterKPa(double tC) {
        return E0_KPA * Math.exp(A_W * tC / (B_W + tC));
    }

    /** Pure-phase saturation vapour pressure over plane ice, kPa. */
    public static double overIceKPa(double tC) {
        return E0_KPA * Math.exp(A_I * tC / (B_I + tC));
    }

    /** Enhancement factor f(p) = 1.0016 + 3.15e-6 p - 0.074/p, p in hPa (eq. 4.B.5). */
    public static double enhancement(double pressureKPa) {
        double pHPa = pressureKPa * 10.0;
        return 1.0016 + 3.15e-6 * pHPa - 0.074 / pHPa;
    }

    /** Saturation vapour pressure of water in moist air, e'_w = f(p) e_w(t), kPa (eq. 4.B.2). */
    public static double moistOverWaterKPa(double tC, double pressureKPa) {
        return enhancement(pressureKPa) * overWaterKPa(tC);
    }

    /** Saturation vapour pressure of ice in moist air, e'_i = f(p) e_i(t), kPa. */
    public static double moistOverIceKPa(double tC, double pressureKPa) {
        return enhancement(pressureKPa) * overIceKPa(tC);
    }

    /** Dew point over water from the vapour pressure in moist air (inverse of 4.B.1/4.B.2), degC. */
    public static double dewPointC(double vapourKPa, double pressureKPa) {
        double x = Math.log(vapourKPa / (E0_KPA * enhancement(pressureKPa)));
        return B_W * x / (A_W - x);
    }

    /** Dew point over water from dry bulb and RH over water; f(p) cancels, so no pressure is needed. */
    public static double dewPointFromRhC(double tC, double rhPercent) {
        double x = Math.log(rhPercent / 100.0) + A_W * tC / (B_W + tC);
        return B_W * x / (A_W - x);
    }

    /** Frost point over ice from the vapour pressure in moist air, degC. */
    public static double frostPointC(double vapourKPa, double pressureKPa) {
        double x = Math.log(vapourKPa / (E0_KPA * enhancement(pressureKPa)));
        return B_I * x / (A_I - x);
    }
}
