package byre.climate;

import byre.units.Quantity;
import java.util.Locale;

/**
 * Derives every zone quantity from the zone's fresh inputs: checks the inputs, then runs the
 * {@link Recipe} table in order. Pure and allocation-light: the daemon calls it for a zone whenever
 * one of its inputs changes.
 *
 * <p>Humidity comes from an RH sensor if present, else from the psychrometer (dry and wet bulb at
 * station pressure), else from a dew-point sensor. Which saturation form feeds which stream: rh,
 * dew point, wet bulb and vpd use the WMO Magnus form over water ({@link Magnus}), the convention
 * of the design; humidity ratio and enthalpy apply ASHRAE 2017 eqs. 20 and 30 to that vapour
 * pressure; station pressure from elevation is ASHRAE eq. 3. A derived wet bulb is the reading of
 * an aspirated psychrometer (close to the thermodynamic wet bulb), whatever the zone's instrument.
 */
public final class ZoneClimate {
    private ZoneClimate() {}

    /** A wet bulb this much above the dry bulb is a sensor fault, not rounding. */
    public static final double WET_ABOVE_DRY_TOLERANCE_C = 0.3;

    public static DerivedClimate derive(ClimateInputs in) {
        DerivedClimate out = new DerivedClimate(in);
        double t = in.dryBulbC();
        boolean dry = !Double.isNaN(t);
        out.set(Quantity.DRY_BULB, t, false);
        out.set(Quantity.GLOBE, in.globeC(), false);
        out.set(Quantity.SOLAR, in.solarWm2(), false);
        if (dry && (t < Magnus.WATER_MIN_C || t > Magnus.WATER_MAX_C)) out.note(Note.MAGNUS_OUT_OF_RANGE);

        double p = stationPressure(in, out);
        out.set(Quantity.PRESSURE, p, false);

        double ws = in.airSpeedMps();
        if (ws < 0) {
            out.problem(String.format(Locale.ROOT, "air speed %.2f m/s is negative: %s skipped", ws,
                    Derivable.readersOf(Quantity.AIR_SPEED, in.thiVariant())));
            ws = Double.NaN;
        }
        out.set(Quantity.AIR_SPEED, ws, false);

        double twIn = in.wetBulbC();
        if (!Double.isNaN(twIn) && dry && twIn > t + WET_ABOVE_DRY_TOLERANCE_C) {
            out.problem(String.format(Locale.ROOT,
                    "wet bulb %.2f C is above dry bulb %.2f C by more than %.1f C: check the wick, its water and the sensors;"
                            + " wet-bulb ignored", twIn, t, WET_ABOVE_DRY_TOLERANCE_C));
            twIn = Double.NaN;
        }
        double rhIn = in.rhPercent();
        if (rhIn < 0 || rhIn > 100) {
            out.problem(String.format(Locale.ROOT, "rh %.1f %% is outside 0-100 %%: rh ignored", rhIn));
            rhIn = Double.NaN;
        }
        double tdIn = in.dewPointC();
        if (!Double.isNaN(tdIn) && dry && tdIn > t + WET_ABOVE_DRY_TOLERANCE_C) {
            out.problem(String.format(Locale.ROOT, "dew point %.2f C is above dry bulb %.2f C: dew-point ignored", tdIn, t));
            tdIn = Double.NaN;
        }
        out.set(Quantity.RH, rhIn, false);
        out.set(Quantity.WET_BULB, twIn, false);
        out.set(Quantity.DEW_POINT, tdIn, false);
        out.ewKPa = dry ? Magnus.moistOverWaterKPa(t, p) : Double.NaN;

        // The table, in order: a measured value wins, else the first recipe whose inputs are here.
        ThiVariant variant = in.thiVariant();
        for (Recipe r : Recipe.ALL) {
            if (!r.appliesTo(variant) || out.has(r.quantity()) || !hasAll(out, r.inputs())) continue;
            out.set(r, r.compute(out));
        }
        return out;
    }

    private static boolean hasAll(DerivedClimate d, java.util.List<Quantity> qs) {
        for (int i = 0; i < qs.size(); i++) if (!d.has(qs.get(i))) return false;
        return true;
    }

    private static double stationPressure(ClimateInputs in, DerivedClimate out) {
        double measured = in.pressureKPa();
        if (!Double.isNaN(measured)) {
            if (Quantity.PRESSURE.isPlausible(measured)) return measured;
            out.problem(String.format(Locale.ROOT,
                    "pressure %.2f kPa is outside %.0f-%.0f kPa: ignored, using elevation or sea level", measured,
                    Quantity.PRESSURE.plausibleMin(), Quantity.PRESSURE.plausibleMax()));
        }
        double z = in.elevationM();
        if (!Double.isNaN(z)) {
            if (z >= -500 && z <= 6000) {
                out.note(Note.PRESSURE_FROM_ELEVATION);
                return Ashrae.standardPressureKPa(z);
            }
            out.problem(String.format(Locale.ROOT, "elevation %.0f m is outside -500..6000 m: ignored", z));
        }
        out.note(Note.PRESSURE_STANDARD);
        return Ashrae.SEA_LEVEL_KPA;
    }
}
