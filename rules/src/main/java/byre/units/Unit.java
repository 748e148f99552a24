package byre.units;

import java.util.Arrays;
import java.util.List;
import java.util.Optional;

/**
 * A unit accepted in configuration, rule files and the command line, with its conversion to the
 * canonical unit of its dimension: canonical = value * scale + offset.
 */
public enum Unit {
    C("C", Dimension.TEMPERATURE, 1.0, 0.0),
    F("F", Dimension.TEMPERATURE, 5.0 / 9.0, -32.0 * 5.0 / 9.0),
    K("K", Dimension.TEMPERATURE, 1.0, -273.15),
    PERCENT("%", Dimension.RELATIVE_HUMIDITY, 1.0, 0.0),
    M_PER_S("m/s", Dimension.SPEED, 1.0, 0.0),
    KM_PER_H("km/h", Dimension.SPEED, 1.0 / 3.6, 0.0),
    MPH("mph", Dimension.SPEED, 0.44704, 0.0),
    FT_PER_MIN("ft/min", Dimension.SPEED, 0.00508, 0.0),
    KPA("kPa", Dimension.PRESSURE, 1.0, 0.0),
    HPA("hPa", Dimension.PRESSURE, 0.1, 0.0),
    PA("Pa", Dimension.PRESSURE, 0.001, 0.0),
    MBAR("mbar", Dimension.PRESSURE, 0.1, 0.0),
    INHG("inHg", Dimension.PRESSURE, 3.386389, 0.0),
    W_PER_M2("W/m2", Dimension.IRRADIANCE, 1.0, 0.0),
    G_PER_KG("g/kg", Dimension.HUMIDITY_RATIO, 1.0, 0.0),
    KJ_PER_KG("kJ/kg", Dimension.ENTHALPY, 1.0, 0.0),
    NONE("", Dimension.INDEX, 1.0, 0.0);

    private final String symbol;
    private final Dimension dimension;
    private final double scale;
    private final double offset;

    Unit(String symbol, Dimension dimension, double scale, double offset) {
        this.symbol = symbol;
        this.dimension = dimension;
        this.scale = scale;
        this.offset = offset;
    }

    public String symbol() { return symbol; }

    public Dimension dimension() { return dimension; }

    /** An absolute value in this unit, in the canonical unit (41 F -> 5 C). */
    public double toCanonical(double value) { return value * scale + offset; }

    /** A canonical value in this unit (5 C -> 41 F). */
    public double fromCanonical(double canonical) { return (canonical - offset) / scale; }

    /** A difference in this unit, as a canonical difference (a rise of 9 F -> 5 C). */
    public double deltaToCanonical(double delta) { return delta * scale; }

    /** A canonical difference in this unit. */
    public double deltaFromCanonical(double canonicalDelta) { return canonicalDelta / scale; }

    /** Looks a unit up by the symbol users write; a few common spellings are accepted too. */
    public static Optional<Unit> bySymbol(String text) {
        if (text == null) return Optional.empty();
        String s = text.trim();
        for (Unit u : values()) {
            if (u.symbol.equals(s)) return Optional.of(u);
        }
        switch (s) {
            case "degC": case "°C": case "Cel": return Optional.of(C);
            case "degF": case "°F": return Optional.of(F);
            case "%RH": return Optional.of(PERCENT);
            case "m/s2": return Optional.empty();
            case "W/m^2": case "W/m²": return Optional.of(W_PER_M2);
            default: return Optional.empty();
        }
    }

    /** Symbols users may write, for help texts and did-you-mean suggestions. */
    public static List<String> symbols() {
        return Arrays.stream(values()).map(Unit::symbol).filter(s -> !s.isEmpty()).toList();
    }

    static Unit canonical(Dimension d) {
        return switch (d) {
            case TEMPERATURE -> C;
            case RELATIVE_HUMIDITY -> PERCENT;
            case SPEED -> M_PER_S;
            case PRESSURE -> KPA;
            case IRRADIANCE -> W_PER_M2;
            case HUMIDITY_RATIO -> G_PER_KG;
            case ENTHALPY -> KJ_PER_KG;
            case INDEX -> NONE;
        };
    }
}
