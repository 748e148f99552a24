package byre.climate;

/** Temperature-humidity index forms for cattle; sources at {@link ThiVariant}. T in degC, RH in %. */
public final class Thi {
    private Thi() {}

    public static double nrc1971(double tC, double rhPercent) {
        return (1.8 * tC + 32) - (0.55 - 0.0055 * rhPercent) * (1.8 * tC - 26);
    }

    public static double thomWetBulb(double tC, double wetBulbC) {
        return 0.72 * (tC + wetBulbC) + 40.6;
    }

    public static double dewPointForm(double tC, double dewPointC) {
        return tC + 0.36 * dewPointC + 41.2;
    }

    public static double mader2006(double tC, double rhPercent) {
        return 0.8 * tC + (rhPercent / 100.0) * (tC - 14.4) + 46.4;
    }

    public static double mader2006Adjusted(double tC, double rhPercent, double airSpeedMps, double solarWm2) {
        return 4.51 + mader2006(tC, rhPercent) - 1.992 * airSpeedMps + 0.0068 * solarWm2;
    }
}
