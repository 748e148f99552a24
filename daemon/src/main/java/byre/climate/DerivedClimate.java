package byre.climate;

import byre.units.Quantity;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collections;
import java.util.List;

/**
 * Every quantity of one zone after derivation, in canonical units (degC, %, m/s, kPa, W/m2, g/kg,
 * kJ/kg, index); NaN where inputs are missing or a problem stopped that derivation. Inputs are
 * passed through (pressure is the station pressure used). Also carries the conventions applied
 * ({@link #notes()}) and the input problems found ({@link #problems()}).
 */
public final class DerivedClimate {
    private static final Quantity[] QUANTITIES = Quantity.values();

    private final ClimateInputs inputs;
    final double[] values = new double[QUANTITIES.length];
    int derivedMask;
    int noteMask;
    private List<String> problems;

    DerivedClimate(ClimateInputs inputs) {
        this.inputs = inputs;
        Arrays.fill(values, Double.NaN);
    }

    public ClimateInputs inputs() { return inputs; }

    /** The value in the quantity's canonical unit, NaN when absent. */
    public double value(Quantity q) { return values[q.ordinal()]; }

    public boolean has(Quantity q) { return !Double.isNaN(values[q.ordinal()]); }

    /** True when byre computed the value here (a zone stream to publish), false for a passed-through input. */
    public boolean isDerived(Quantity q) { return (derivedMask & (1 << q.ordinal())) != 0; }

    /** A copy of all values, indexed by {@link Quantity#ordinal()}. */
    public double[] values() { return values.clone(); }

    public boolean hasNote(Note n) { return (noteMask & (1 << n.ordinal())) != 0; }

    public List<Note> notes() {
        List<Note> list = new ArrayList<>();
        for (Note n : Note.values()) if (hasNote(n)) list.add(n);
        return list;
    }

    /** Input problems; each one skipped the derivations that needed that input, the rest still ran. */
    public List<String> problems() {
        return problems == null ? List.of() : Collections.unmodifiableList(problems);
    }

    public boolean hasProblems() { return problems != null; }

    /** THI category in a scale, or null when THI is absent. */
    public String thiCategory(ThiScale scale) { return scale.category(value(Quantity.THI)); }

    void set(Quantity q, double v, boolean derived) {
        values[q.ordinal()] = v;
        if (derived && !Double.isNaN(v)) derivedMask |= 1 << q.ordinal();
    }

    void note(Note n) { noteMask |= 1 << n.ordinal(); }

    void problem(String text) {
        if (problems == null) problems = new ArrayList<>(2);
        problems.add(text);
    }

    /**
     * The absent inputs that keep a quantity from being computed, as input names ("air-speed",
     * "wet-bulb or rh"); empty when the quantity is present or was skipped for a problem.
     */
    public List<String> missingInputs(Quantity q) {
        if (has(q)) return List.of();
        boolean dry = !Double.isNaN(inputs.dryBulbC());
        boolean humid = !Double.isNaN(inputs.rhPercent()) || !Double.isNaN(inputs.wetBulbC())
                || !Double.isNaN(inputs.dewPointC());
        boolean wind = !Double.isNaN(inputs.airSpeedMps());
        List<String> need = new ArrayList<>(3);
        switch (q) {
            case DRY_BULB: case AIR_SPEED: case GLOBE: case SOLAR:
                if (!q.measurable() || Double.isNaN(rawInput(q))) need.add(q.id());
                break;
            case PRESSURE:
                break;
            case WIND_CHILL:
                if (!dry) need.add("dry-bulb");
                if (!wind) need.add("air-speed");
                break;
            case BGHI:
                if (Double.isNaN(inputs.globeC())) need.add("globe");
                addHumidity(need, dry || !Double.isNaN(inputs.dewPointC()), humid);
                break;
            case CCI:
                addHumidity(need, dry, humid);
                if (!wind) need.add("air-speed");
                break;
            case THI:
                addHumidity(need, dry, humid);
                if (inputs.thiVariant().needsAirSpeed() && !wind) need.add("air-speed");
                break;
            case DEW_POINT:
                addHumidity(need, dry || !Double.isNaN(inputs.dewPointC()), humid);
                break;
            default:
                addHumidity(need, dry, humid);
        }
        return need;
    }

    private double rawInput(Quantity q) {
        switch (q) {
            case DRY_BULB: return inputs.dryBulbC();
            case AIR_SPEED: return inputs.airSpeedMps();
            case GLOBE: return inputs.globeC();
            case SOLAR: return inputs.solarWm2();
            default: return Double.NaN;
        }
    }

    private static void addHumidity(List<String> need, boolean dry, boolean humid) {
        if (!dry) need.add("dry-bulb");
        if (!humid) need.add("wet-bulb or rh");
    }

    /** The method behind a value, for people: "psychrometer equation, WMO-No. 8 Annex 4.B, aspirated". */
    public String method(Quantity q) {
        boolean derived = isDerived(q);
        switch (q) {
            case RH:
                if (!derived) return "measured";
                if (!Double.isNaN(inputs.wetBulbC())) {
                    return inputs.psychrometer() == Psychrometer.ASPIRATED
                            ? "psychrometer equation, WMO-No. 8 Annex 4.B, aspirated"
                            : "psychrometer equation, FAO-56 screen coefficient";
                }
                return "from dew point, WMO-No. 8 Magnus form";
            case DEW_POINT: return derived ? "inverse Magnus over water, WMO-No. 8 Annex 4.B" : "measured";
            case WET_BULB: return derived ? "aspirated psychrometer equation solved for Tw, WMO-No. 8" : "measured";
            case PRESSURE:
                if (hasNote(Note.PRESSURE_FROM_ELEVATION)) return "standard atmosphere, ASHRAE 2017 ch. 1 eq. 3";
                if (hasNote(Note.PRESSURE_STANDARD)) return "standard sea level";
                return "measured";
            case HUMIDITY_RATIO: return "ASHRAE 2017 ch. 1 eq. 20";
            case ENTHALPY: return "ASHRAE 2017 ch. 1 eq. 30";
            case VPD: return "e'w(p,T) - e', WMO-No. 8 Magnus form";
            case THI: return inputs.thiVariant().method();
            case HEAT_INDEX: return "NWS heat index (Rothfusz 1990)";
            case WIND_CHILL: return "NWS/MSC 2001 wind chill";
            case CCI: return "Mader, Johnson & Gaughan 2010";
            case BGHI: return "Buffington et al. 1981";
            case SOLAR: return has(q) ? "measured" : "";
            default: return "measured";
        }
    }
}
