package byre.climate;

/**
 * NWS heat index, the algorithm of the WPC page "The Heat Index Equation" (Rothfusz 1990, NWS
 * Technical Attachment SR 90-23, fitted to Steadman 1979): the simple formula first; at 80 F or more
 * the Rothfusz regression with its low-humidity and high-humidity adjustments.
 */
public final class HeatIndex {
    private HeatIndex() {}

    /** Below this (F, by the simple formula) the simple formula is the heat index. */
    public static final double REGRESSION_FROM_F = 80.0;

    public static double fahrenheit(double tF, double rhPercent) {
        double simple = 0.5 * (tF + 61.0 + (tF - 68.0) * 1.2 + rhPercent * 0.094);
        if (simple < REGRESSION_FROM_F) return simple;
        double t = tF, r = rhPercent;
        double hi = -42.379 + 2.04901523 * t + 10.14333127 * r - 0.22475541 * t * r - 0.00683783 * t * t
                - 0.05481717 * r * r + 0.00122874 * t * t * r + 0.00085282 * t * r * r - 0.00000199 * t * t * r * r;
        if (r < 13 && t >= 80 && t <= 112) {
            hi -= ((13 - r) / 4) * Math.sqrt((17 - Math.abs(t - 95)) / 17);
        } else if (r > 85 && t >= 80 && t <= 87) {
            hi += ((r - 85) / 10) * ((87 - t) / 5);
        }
        return hi;
    }

    public static double celsius(double tC, double rhPercent) {
        return (fahrenheit(tC * 1.8 + 32.0, rhPercent) - 32.0) / 1.8;
    }
}
