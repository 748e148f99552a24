package byre.units;

/** What a quantity measures; units convert only within one dimension. */
public enum Dimension {
    TEMPERATURE("degC"),
    RELATIVE_HUMIDITY("%"),
    SPEED("m/s"),
    PRESSURE("kPa"),
    IRRADIANCE("W/m2"),
    HUMIDITY_RATIO("g/kg"),
    ENTHALPY("kJ/kg"),
    INDEX("");

    private final String canonicalSymbol;

    Dimension(String canonicalSymbol) {
        this.canonicalSymbol = canonicalSymbol;
    }

    /** Symbol of the unit every value of this dimension is kept in inside byre. */
    public String canonicalSymbol() {
        return canonicalSymbol;
    }

    public Unit canonicalUnit() {
        return Unit.canonical(this);
    }
}
