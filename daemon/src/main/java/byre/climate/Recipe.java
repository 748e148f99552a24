package byre.climate;

import static byre.units.Quantity.AIR_SPEED;
import static byre.units.Quantity.DEW_POINT;
import static byre.units.Quantity.DRY_BULB;
import static byre.units.Quantity.GLOBE;
import static byre.units.Quantity.HUMIDITY_RATIO;
import static byre.units.Quantity.RH;
import static byre.units.Quantity.SOLAR;
import static byre.units.Quantity.WET_BULB;

import byre.units.Quantity;
import java.util.List;
import java.util.Locale;
import java.util.function.Function;

/**
 * The one table of derived quantities: each recipe names the quantity it gives, the zone streams it
 * reads (all must be present) and its formula. {@link ZoneClimate} runs it, {@link Derivable} reads it
 * to say which streams a zone can ever have and which inputs a missing one needs (for {@code byre check},
 * reloads and {@code byre calc}), so the three cannot drift apart.
 *
 * <p>A quantity with several recipes takes the first whose inputs are present; a measured value wins
 * over every recipe. A recipe reads only measured streams and quantities of recipes above it (checked
 * when the class loads). Station pressure is no input here: it always has a value (barometer, else the
 * zone's elevation, else sea level). Solar radiation is optional where a formula uses it: absent, it is
 * 0 W/m2 (indoors) and a note says so. THI has one recipe per published form; a zone uses the one of
 * its {@code thi:} setting.
 */
public enum Recipe {
    RH_FROM_WET_BULB(RH, null, List.of(DRY_BULB, WET_BULB), Recipe::rhFromWetBulb,
            in -> in.psychrometer() == Psychrometer.ASPIRATED ? "psychrometer equation, WMO-No. 8 Annex 4.B, aspirated"
                    : "psychrometer equation, FAO-56 screen coefficient"),
    RH_FROM_DEW_POINT(RH, null, List.of(DRY_BULB, DEW_POINT),
            d -> Math.min(100.0, 100.0 * Magnus.moistOverWaterKPa(d.value(DEW_POINT), d.pressureKPa()) / d.ewKPa),
            in -> "from dew point, WMO-No. 8 Magnus form"),
    WET_BULB_FROM_RH(WET_BULB, null, List.of(DRY_BULB, RH), d -> {
        double e = d.vapourKPa();
        return e > 0 ? Psychrometer.ASPIRATED.wetBulbC(d.value(DRY_BULB), e, d.pressureKPa()) : Double.NaN;
    }, in -> "aspirated psychrometer equation solved for Tw, WMO-No. 8"),
    DEW_POINT_FROM_RH(DEW_POINT, null, List.of(DRY_BULB, RH), d -> {
        double e = d.vapourKPa();
        return e > 0 ? Math.min(Magnus.dewPointC(e, d.pressureKPa()), d.value(DRY_BULB)) : Double.NaN;
    }, in -> "inverse Magnus over water, WMO-No. 8 Annex 4.B"),
    HUMIDITY_RATIO_FROM_RH(HUMIDITY_RATIO, null, List.of(DRY_BULB, RH),
            d -> Ashrae.humidityRatio(d.vapourKPa(), d.pressureKPa()) * 1000.0, in -> "ASHRAE 2017 ch. 1 eq. 20"),
    ENTHALPY(Quantity.ENTHALPY, null, List.of(DRY_BULB, HUMIDITY_RATIO),
            d -> Ashrae.enthalpyKJPerKg(d.value(DRY_BULB), d.value(HUMIDITY_RATIO) / 1000.0), in -> "ASHRAE 2017 ch. 1 eq. 30"),
    VPD(Quantity.VPD, null, List.of(DRY_BULB, RH), d -> Math.max(0.0, d.ewKPa - d.vapourKPa()),
            in -> "e'w(p,T) - e', WMO-No. 8 Magnus form"),
    THI_NRC_1971(Quantity.THI, ThiVariant.NRC_1971, List.of(DRY_BULB, RH),
            d -> Thi.nrc1971(d.value(DRY_BULB), d.value(RH)), null),
    THI_THOM_WET_BULB(Quantity.THI, ThiVariant.THOM_WET_BULB, List.of(DRY_BULB, WET_BULB),
            d -> Thi.thomWetBulb(d.value(DRY_BULB), d.value(WET_BULB)), null),
    THI_DEW_POINT(Quantity.THI, ThiVariant.DEW_POINT, List.of(DRY_BULB, DEW_POINT),
            d -> Thi.dewPointForm(d.value(DRY_BULB), d.value(DEW_POINT)), null),
    THI_MADER_2006(Quantity.THI, ThiVariant.MADER_2006, List.of(DRY_BULB, RH),
            d -> Thi.mader2006(d.value(DRY_BULB), d.value(RH)), null),
    THI_MADER_2006_ADJUSTED(Quantity.THI, ThiVariant.MADER_2006_ADJUSTED, List.of(DRY_BULB, RH, AIR_SPEED), d -> {
        if (!d.has(SOLAR)) d.note(Note.THI_SOLAR_ASSUMED_ZERO);
        return Thi.mader2006Adjusted(d.value(DRY_BULB), d.value(RH), d.value(AIR_SPEED), d.solarOrZero());
    }, null),
    HEAT_INDEX(Quantity.HEAT_INDEX, null, List.of(DRY_BULB, RH), d -> {
        double hiF = HeatIndex.fahrenheit(d.value(DRY_BULB) * 1.8 + 32.0, d.value(RH));
        if (hiF < HeatIndex.REGRESSION_FROM_F) d.note(Note.HEAT_INDEX_SIMPLE);
        return (hiF - 32.0) / 1.8;
    }, in -> "NWS heat index (Rothfusz 1990)"),
    WIND_CHILL(Quantity.WIND_CHILL, null, List.of(DRY_BULB, AIR_SPEED), Recipe::windChill, in -> "NWS/MSC 2001 wind chill"),
    CCI(Quantity.CCI, null, List.of(DRY_BULB, RH, AIR_SPEED), d -> {
        double t = d.value(DRY_BULB);
        if (!d.has(SOLAR)) d.note(Note.SOLAR_ASSUMED_ZERO);
        if (t < Cci.MIN_C || t > Cci.MAX_C) d.note(Note.CCI_OUT_OF_RANGE);
        return Cci.celsius(t, d.value(RH), d.value(AIR_SPEED), d.solarOrZero());
    }, in -> "Mader, Johnson & Gaughan 2010"),
    BGHI(Quantity.BGHI, null, List.of(GLOBE, DEW_POINT), d -> Bghi.index(d.value(GLOBE), d.value(DEW_POINT)),
            in -> "Buffington et al. 1981");

    /** A formula over the zone's values so far; NaN when the values give none (it may note or report why). */
    interface Formula {
        double compute(DerivedClimate d);
    }

    private final Quantity quantity;
    private final ThiVariant variant;
    private final List<Quantity> inputs;
    private final Formula formula;
    private final Function<ClimateInputs, String> method;

    Recipe(Quantity quantity, ThiVariant variant, List<Quantity> inputs, Formula formula, Function<ClimateInputs, String> method) {
        this.quantity = quantity;
        this.variant = variant;
        this.inputs = inputs;
        this.formula = formula;
        this.method = method;
    }

    /** The quantity this recipe gives. */
    public Quantity quantity() { return quantity; }

    /** The streams it reads, all required. */
    public List<Quantity> inputs() { return inputs; }

    /** The THI form this recipe is, or null for a recipe every zone uses. */
    public ThiVariant variant() { return variant; }

    /** True when a zone computing THI by {@code v} uses this recipe. */
    public boolean appliesTo(ThiVariant v) { return variant == null || variant == v; }

    /** The method and its source, for people. */
    public String method(ClimateInputs in) { return variant != null ? variant.method() : method.apply(in); }

    double compute(DerivedClimate d) { return formula.compute(d); }

    /** The table in order; shared, never modified. */
    static final Recipe[] ALL = values();

    static {
        // Each recipe reads only measured streams or what recipes above it give, so one pass in order derives all.
        java.util.Set<Quantity> given = java.util.EnumSet.noneOf(Quantity.class);
        for (Quantity q : Quantity.values()) if (q.measurable()) given.add(q);
        for (Recipe r : ALL) {
            if (!given.containsAll(r.inputs)) throw new ExceptionInInitializerError(r + " reads a quantity derived below it");
            given.add(r.quantity);
        }
    }

    private static double rhFromWetBulb(DerivedClimate d) {
        ClimateInputs in = d.inputs();
        double t = d.value(DRY_BULB), tw = d.value(WET_BULB), p = d.pressureKPa();
        double twUsed = tw;
        if (twUsed > t) {
            d.note(Note.WET_BULB_SLIGHTLY_HIGH);
            twUsed = t;
        }
        if (twUsed < 0) d.note(Note.ICE_BULB);
        double rhP = 100.0 * in.psychrometer().vapourPressureKPa(t, twUsed, p) / d.ewKPa;
        if (rhP < 0) {
            d.problem(String.format(Locale.ROOT,
                    "dry bulb %.2f C with wet bulb %.2f C gives RH %.1f %% (below 0) for a %s psychrometer:"
                            + " impossible reading, humidity values skipped", t, tw, rhP, in.psychrometer().id()));
            d.set(WET_BULB, Double.NaN, false); // a faulty wet bulb feeds nothing below (Thom's THI reads it too)
            return Double.NaN;
        }
        return rhP;
    }

    private static double windChill(DerivedClimate d) {
        double t = d.value(DRY_BULB);
        double v10 = WindChill.penTo10mKmh(d.value(AIR_SPEED));
        if (t > WindChill.MAX_AIR_C) {
            d.note(Note.WIND_CHILL_WARM);
            return t;
        }
        if (v10 < WindChill.MIN_WIND_KMH) {
            d.note(Note.WIND_CHILL_CALM);
            return t;
        }
        d.note(Note.WIND_CHILL_PEN_WIND);
        return WindChill.formulaC(t, v10);
    }
}
