package byre.climate;

/**
 * Psychrometer equation, WMO-No. 8 Annex 4.B form: e' = e'_sat(p, Tw) - A p (T - Tw), with e'_sat over
 * water for a wet bulb at or above 0 C and over ice below (ice-covered bulb). Relative humidity is
 * e' / e'_w(p, T), with respect to water at all temperatures. Uses the Magnus saturation form
 * ({@link Magnus}) because the coefficients below were fitted with it. Pressures in kPa.
 */
public enum Psychrometer {
    /**
     * Aspirated (Assmann type, about 2-3 m/s over the bulb): WMO-No. 8 Annex 4.B coefficients,
     * water A = 6.53e-4 (1 + 0.000944 Tw) per K, ice A = 5.75e-4 per K.
     */
    ASPIRATED("aspirated", 6.53e-4, 0.000944, 5.75e-4),
    /**
     * Screen or naturally ventilated (about 1 m/s): FAO Irrigation and Drainage Paper 56 (Allen et
     * al. 1998) eq. 15-16, a = 8.0e-4 per K. FAO gives no ice value; the ice coefficient is the FAO
     * value scaled by the WMO ice/water ratio 5.75/6.53 (the ratio of the latent heats, common practice).
     * Poorly ventilated bulbs read high, so RH from this type is uncertain by several %RH.
     */
    SCREEN("screen", 8.0e-4, 0.0, 8.0e-4 * 5.75 / 6.53);

    private final String id;
    private final double waterA;
    private final double waterATw;
    private final double iceA;

    Psychrometer(String id, double waterA, double waterATw, double iceA) {
        this.id = id;
        this.waterA = waterA;
        this.waterATw = waterATw;
        this.iceA = iceA;
    }

    /** The name written in configuration and on the command line. */
    public String id() { return id; }

    public static Psychrometer byId(String id) {
        for (Psychrometer p : values()) if (p.id.equalsIgnoreCase(id)) return p;
        return null;
    }

    /** Vapour pressure of the air from the psychrometer readings, kPa; ice-covered bulb when Tw < 0 C. */
    public double vapourPressureKPa(double dryBulbC, double wetBulbC, double pressureKPa) {
        double depression = dryBulbC - wetBulbC;
        if (wetBulbC >= 0) {
            return Magnus.moistOverWaterKPa(wetBulbC, pressureKPa)
                    - waterA * (1.0 + waterATw * wetBulbC) * pressureKPa * depression;
        }
        return Magnus.moistOverIceKPa(wetBulbC, pressureKPa) - iceA * pressureKPa * depression;
    }

    /** Relative humidity over water from the psychrometer, %. May be below 0 for impossible readings. */
    public double relativeHumidity(double dryBulbC, double wetBulbC, double pressureKPa) {
        return 100.0 * vapourPressureKPa(dryBulbC, wetBulbC, pressureKPa)
                / Magnus.moistOverWaterKPa(dryBulbC, pressureKPa);
    }

    static final int MAX_ITERATIONS = 60;
    static final double TOLERANCE_K = 1e-6;

    /**
     * The wet-bulb reading this psychrometer would show for air of the given vapour pressure: Newton
     * steps kept inside a shrinking bracket [dew point, dry bulb] (bisection when a step leaves it),
     * at most {@value #MAX_ITERATIONS} steps. Where the ice and water branches leave a gap at 0 C the
     * answer is 0 C, the freezing plateau of a real bulb. NaN when an input is not finite.
     */
    public double wetBulbC(double dryBulbC, double vapourKPa, double pressureKPa) {
        if (!(vapourKPa > 0) || Double.isNaN(dryBulbC) || !(pressureKPa > 0)) return Double.NaN;
        double lo = Math.min(Magnus.dewPointC(vapourKPa, pressureKPa), dryBulbC);
        double hi = dryBulbC;
        if (vapourPressureKPa(dryBulbC, hi, pressureKPa) <= vapourKPa) return hi; // saturated (or over ice)
        double tw = lo + (hi - lo) * 0.35;
        for (int i = 0; i < MAX_ITERATIONS; i++) {
            double g = vapourPressureKPa(dryBulbC, tw, pressureKPa) - vapourKPa;
            if (g > 0) hi = tw; else lo = tw;
            double next = tw - g / slope(dryBulbC, tw, pressureKPa);
            if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
            if (Math.abs(next - tw) < TOLERANCE_K || hi - lo < TOLERANCE_K) return next;
            tw = next;
        }
        return tw;
    }

    /** d e' / d Tw, kPa per K, for the Newton step. */
    private double slope(double dryBulbC, double wetBulbC, double pressureKPa) {
        if (wetBulbC >= 0) {
            double b = Magnus.B_W + wetBulbC;
            return Magnus.moistOverWaterKPa(wetBulbC, pressureKPa) * Magnus.A_W * Magnus.B_W / (b * b)
                    + waterA * pressureKPa * (1.0 + waterATw * wetBulbC - waterATw * (dryBulbC - wetBulbC));
        }
        double b = Magnus.B_I + wetBulbC;
        return Magnus.moistOverIceKPa(wetBulbC, pressureKPa) * Magnus.A_I * Magnus.B_I / (b * b) + iceA * pressureKPa;
    }
}
