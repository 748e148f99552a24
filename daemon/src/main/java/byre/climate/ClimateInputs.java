package byre.climate;

import byre.units.Quantity;

/**
 * The fresh readings of one zone, in canonical units; {@code NaN} means absent. Enums default to
 * an aspirated psychrometer and the NRC 1971 THI when null.
 *
 * @param dryBulbC     air temperature, degC
 * @param wetBulbC     psychrometer wet bulb, degC
 * @param rhPercent    relative humidity over water from a hygrometer, %
 * @param dewPointC    dew point from a dew-point sensor, degC
 * @param airSpeedMps  air speed at animal height, m/s
 * @param solarWm2     global solar irradiance, W/m2 (absent = 0, indoors)
 * @param globeC       black-globe temperature, degC
 * @param pressureKPa  measured station pressure, kPa (absent: from elevation, else 101.325)
 * @param elevationM   zone elevation, m
 */
public record ClimateInputs(double dryBulbC, double wetBulbC, double rhPercent, double dewPointC,
                            double airSpeedMps, double solarWm2, double globeC, double pressureKPa,
                            double elevationM, Psychrometer psychrometer, ThiVariant thiVariant) {

    public ClimateInputs {
        if (psychrometer == null) psychrometer = Psychrometer.ASPIRATED;
        if (thiVariant == null) thiVariant = ThiVariant.NRC_1971;
    }

    /** The reading given for a measured quantity, NaN when absent or when the quantity is never measured. */
    public double measured(Quantity q) {
        return switch (q) {
            case DRY_BULB -> dryBulbC;
            case WET_BULB -> wetBulbC;
            case RH -> rhPercent;
            case DEW_POINT -> dewPointC;
            case AIR_SPEED -> airSpeedMps;
            case SOLAR -> solarWm2;
            case GLOBE -> globeC;
            case PRESSURE -> pressureKPa;
            case HUMIDITY_RATIO, ENTHALPY, VPD, THI, HEAT_INDEX, WIND_CHILL, CCI, BGHI, ONLINE -> Double.NaN;
        };
    }

    public static Builder builder() { return new Builder(); }

    /** Fills fields by name; unset values stay absent (NaN). Not thread-safe; reuse is fine. */
    public static final class Builder {
        private double dryBulbC = Double.NaN, wetBulbC = Double.NaN, rhPercent = Double.NaN, dewPointC = Double.NaN,
                airSpeedMps = Double.NaN, solarWm2 = Double.NaN, globeC = Double.NaN, pressureKPa = Double.NaN,
                elevationM = Double.NaN;
        private Psychrometer psychrometer = Psychrometer.ASPIRATED;
        private ThiVariant thiVariant = ThiVariant.NRC_1971;

        public Builder dryBulbC(double v) { dryBulbC = v; return this; }
        public Builder wetBulbC(double v) { wetBulbC = v; return this; }
        public Builder rhPercent(double v) { rhPercent = v; return this; }
        public Builder dewPointC(double v) { dewPointC = v; return this; }
        public Builder airSpeedMps(double v) { airSpeedMps = v; return this; }
        public Builder solarWm2(double v) { solarWm2 = v; return this; }
        public Builder globeC(double v) { globeC = v; return this; }
        public Builder pressureKPa(double v) { pressureKPa = v; return this; }
        public Builder elevationM(double v) { elevationM = v; return this; }
        public Builder psychrometer(Psychrometer v) { psychrometer = v; return this; }
        public Builder thiVariant(ThiVariant v) { thiVariant = v; return this; }

        public ClimateInputs build() {
            return new ClimateInputs(dryBulbC, wetBulbC, rhPercent, dewPointC, airSpeedMps, solarWm2, globeC,
                    pressureKPa, elevationM, psychrometer, thiVariant);
        }
    }
}
