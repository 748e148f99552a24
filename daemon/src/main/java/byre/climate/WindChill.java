package byre.climate;

/**
 * NWS/MSC 2001 wind-chill index (formula as on the NWS chart and the MSC wind-chill page). Defined
 * for air at or below 10 C (50 F) and 10 m wind above 4.8 km/h (3 mph); outside that the usual
 * convention is that wind chill equals the air temperature.
 *
 * <p>The formula wants the wind at 10 m height. A pen anemometer measures at animal height, which
 * the index model takes as 2/3 of the 10 m wind; so a pen air speed is multiplied by
 * {@link #PEN_TO_10M} first (MetPy's face-level-wind correction).
 */
public final class WindChill {
    private WindChill() {}

    public static final double MAX_AIR_C = 10.0;
    public static final double MIN_WIND_KMH = 4.8;
    /** 10 m wind per unit of wind measured at face or animal height. */
    public static final double PEN_TO_10M = 1.5;

    /** The formula in C and km/h (10 m wind), without the validity convention. */
    public static double formulaC(double tC, double wind10mKmh) {
        double v = Math.pow(wind10mKmh, 0.16);
        return 13.12 + 0.6215 * tC - 11.37 * v + 0.3965 * tC * v;
    }

    /** The formula in F and mph (10 m wind), without the validity convention. */
    public static double formulaF(double tF, double wind10mMph) {
        double v = Math.pow(wind10mMph, 0.16);
        return 35.74 + 0.6215 * tF - 35.75 * v + 0.4275 * tF * v;
    }

    /** Wind chill with the convention: air temperature when calm or warm. */
    public static double celsius(double tC, double wind10mKmh) {
        if (tC > MAX_AIR_C || wind10mKmh < MIN_WIND_KMH) return tC;
        return formulaC(tC, wind10mKmh);
    }

    /** Wind chill from a pen (animal-height) air speed in m/s, with the convention. */
    public static double fromPenAirSpeedC(double tC, double airSpeedMps) {
        return celsius(tC, penTo10mKmh(airSpeedMps));
    }

    public static double penTo10mKmh(double airSpeedMps) {
        return airSpeedMps * PEN_TO_10M * 3.6;
    }
}
