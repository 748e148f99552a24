package byre.units;

import java.util.Arrays;
import java.util.List;
import java.util.Optional;

/**
 * Every quantity byre knows, under the names users write in configuration and rules.
 * Values are always held in the canonical unit of the quantity's dimension.
 * The plausible range rejects readings no barn sensor can honestly report.
 */
public enum Quantity {
    DRY_BULB("dry-bulb", Dimension.TEMPERATURE, true, -50, 70),
    WET_BULB("wet-bulb", Dimension.TEMPERATURE, true, -50, 70),
    RH("rh", Dimension.RELATIVE_HUMIDITY, true, 0, 100),
    DEW_POINT("dew-point", Dimension.TEMPERATURE, true, -70, 60),
    AIR_SPEED("air-speed", Dimension.SPEED, true, 0, 60),
    SOLAR("solar", Dimension.IRRADIANCE, true, 0, 1500),
    GLOBE("globe", Dimension.TEMPERATURE, true, -50, 90),
    PRESSURE("pressure", Dimension.PRESSURE, true, 50, 110),
    HUMIDITY_RATIO("humidity-ratio", Dimension.HUMIDITY_RATIO, false, 0, 200),
    ENTHALPY("enthalpy", Dimension.ENTHALPY, false, -100, 500),
    VPD("vpd", Dimension.PRESSURE, false, 0, 20),
    THI("thi", Dimension.INDEX, false, 0, 120),
    HEAT_INDEX("heat-index", Dimension.TEMPERATURE, false, -80, 100),
    WIND_CHILL("wind-chill", Dimension.TEMPERATURE, false, -100, 70),
    CCI("cci", Dimension.TEMPERATURE, false, -100, 100),
    BGHI("bghi", Dimension.INDEX, false, 0, 150),
    /** A site as a central byre sees it: 1 while its byre is online and its bridge connected, 0 when not. No recipe. */
    ONLINE("online", Dimension.INDEX, false, 0, 1);

    private final String id;
    private final Dimension dimension;
    private final boolean measurable;
    private final double plausibleMin;
    private final double plausibleMax;

    Quantity(String id, Dimension dimension, boolean measurable, double plausibleMin, double plausibleMax) {
        this.id = id;
        this.dimension = dimension;
        this.measurable = measurable;
        this.plausibleMin = plausibleMin;
        this.plausibleMax = plausibleMax;
    }

    /** The name users write: {@code dry-bulb}, {@code thi}. */
    public String id() { return id; }

    public Dimension dimension() { return dimension; }

    public Unit canonicalUnit() { return dimension.canonicalUnit(); }

    /**
     * False only for {@link #ONLINE}: a site's link state, known to a central byre, which no sensor measures and no
     * climate recipe gives (it has no place in {@code byre calc} or the derivation table).
     */
    public boolean climate() { return this != ONLINE; }

    /** True if a sensor may report it directly (configuration {@code quantity:}). */
    public boolean measurable() { return measurable; }

    /** Lowest plausible value in the canonical unit. */
    public double plausibleMin() { return plausibleMin; }

    /** Highest plausible value in the canonical unit. */
    public double plausibleMax() { return plausibleMax; }

    public boolean isPlausible(double canonicalValue) {
        return canonicalValue >= plausibleMin && canonicalValue <= plausibleMax;
    }

    public static Optional<Quantity> byId(String id) {
        return Arrays.stream(values()).filter(q -> q.id.equals(id)).findFirst();
    }

    public static List<String> ids() {
        return Arrays.stream(values()).map(Quantity::id).toList();
    }

    @Override
    public String toString() { return id; }
}
