package byre.climate;

import byre.units.Quantity;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collections;
import java.util.EnumSet;
import java.util.List;
import java.util.Set;
import java.util.stream.Collectors;

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
    /** Saturation vapour pressure over water at the dry bulb and station pressure, kPa; NaN without a dry bulb. */
    double ewKPa = Double.NaN;
    /** The recipe that gave each derived value, indexed by {@link Quantity#ordinal()}. */
    private final Recipe[] recipes = new Recipe[QUANTITIES.length];
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

    void set(Recipe r, double v) {
        set(r.quantity(), v, true);
        if (!Double.isNaN(v)) recipes[r.quantity().ordinal()] = r;
    }

    void note(Note n) { noteMask |= 1 << n.ordinal(); }

    void problem(String text) {
        if (problems == null) problems = new ArrayList<>(2);
        problems.add(text);
    }

    /**
     * The absent inputs that keep a quantity from being computed, one entry per missing group of
     * alternatives ("air-speed", "wet-bulb or rh or dew-point"), from the {@link Recipe} table; empty when
     * the quantity is present or its inputs were given but a problem or their values stopped it.
     */
    public List<String> missingInputs(Quantity q) {
        if (has(q)) return List.of();
        if (!q.climate()) return List.of(Derivable.ONLY_SITE_ZONES.replace("`", ""));
        Set<Quantity> given = EnumSet.noneOf(Quantity.class);
        for (Quantity m : Derivable.MEASURED) if (!Double.isNaN(inputs.measured(m))) given.add(m);
        List<String> need = new ArrayList<>(3);
        for (Set<Quantity> g : Derivable.unmet(q, given, inputs.thiVariant())) {
            need.add(g.stream().map(Quantity::id).collect(Collectors.joining(" or ")));
        }
        return need;
    }

    /** The method behind a value, for people: "psychrometer equation, WMO-No. 8 Annex 4.B, aspirated". */
    public String method(Quantity q) {
        Recipe r = recipes[q.ordinal()];
        if (r != null) return r.method(inputs);
        if (q == Quantity.PRESSURE) {
            if (hasNote(Note.PRESSURE_FROM_ELEVATION)) return "standard atmosphere, ASHRAE 2017 ch. 1 eq. 3";
            if (hasNote(Note.PRESSURE_STANDARD)) return "standard sea level";
            return "measured";
        }
        if (q == Quantity.SOLAR) return has(q) ? "measured" : "";
        if (q.measurable()) return "measured";
        // Not computed here: the method the zone would use.
        for (Recipe each : Recipe.ALL) if (each.quantity() == q && each.appliesTo(inputs.thiVariant())) return each.method(inputs);
        return "";
    }

    // ---- for the recipes ----

    /** Station pressure used, kPa (always present). */
    double pressureKPa() { return values[Quantity.PRESSURE.ordinal()]; }

    /** Vapour pressure behind the rh, kPa: rh x e'w(p, T). */
    double vapourKPa() { return values[Quantity.RH.ordinal()] / 100.0 * ewKPa; }

    /** Solar irradiance, 0 W/m2 when there is no sensor (indoors). */
    double solarOrZero() { return has(Quantity.SOLAR) ? values[Quantity.SOLAR.ordinal()] : 0.0; }
}
