package byre.climate;

import byre.units.Quantity;
import java.util.Locale;

/**
 * Derives every zone quantity from the zone's fresh inputs (design section 3). Pure and
 * allocation-light: the daemon calls it for a zone whenever one of its inputs changes.
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
            out.problem(String.format(Locale.ROOT, "air speed %.2f m/s is negative: wind-chill and cci skipped", ws));
            ws = Double.NaN;
        }
        out.set(Quantity.AIR_SPEED, ws, false);

        double ew = dry ? Magnus.moistOverWaterKPa(t, p) : Double.NaN;
        double e = Double.NaN, rh = Double.NaN, tw = Double.NaN, td = Double.NaN;
        boolean rhDerived = false, twDerived = false, tdDerived = false;

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

        if (!Double.isNaN(rhIn)) {
            rh = rhIn;
            e = rh / 100.0 * ew;
        } else if (!Double.isNaN(twIn) && dry) {
            double twUsed = twIn;
            if (twUsed > t) {
                out.note(Note.WET_BULB_SLIGHTLY_HIGH);
                twUsed = t;
            }
            if (twUsed < 0) out.note(Note.ICE_BULB);
            double eP = in.psychrometer().vapourPressureKPa(t, twUsed, p);
            double rhP = 100.0 * eP / ew;
            if (rhP < 0) {
                out.problem(String.format(Locale.ROOT,
                        "dry bulb %.2f C with wet bulb %.2f C gives RH %.1f %% (below 0) for a %s psychrometer:"
                                + " impossible reading, humidity values skipped", t, twIn, rhP, in.psychrometer().id()));
            } else {
                e = eP;
                rh = rhP;
                rhDerived = true;
            }
        } else if (!Double.isNaN(tdIn)) {
            e = Magnus.moistOverWaterKPa(tdIn, p);
            if (dry) {
                rh = Math.min(100.0, 100.0 * e / ew);
                rhDerived = true;
            }
        }

        if (!Double.isNaN(twIn)) {
            tw = twIn;
        } else if (dry && e > 0) {
            tw = Psychrometer.ASPIRATED.wetBulbC(t, e, p);
            twDerived = true;
        }
        if (!Double.isNaN(tdIn)) {
            td = tdIn;
        } else if (e > 0) {
            td = Math.min(Magnus.dewPointC(e, p), dry ? t : Double.POSITIVE_INFINITY);
            tdDerived = true;
        }
        out.set(Quantity.RH, rh, rhDerived);
        out.set(Quantity.WET_BULB, tw, twDerived);
        out.set(Quantity.DEW_POINT, td, tdDerived);

        if (dry && !Double.isNaN(e)) {
            double w = Ashrae.humidityRatio(e, p);
            out.set(Quantity.HUMIDITY_RATIO, w * 1000.0, true);
            out.set(Quantity.ENTHALPY, Ashrae.enthalpyKJPerKg(t, w), true);
            out.set(Quantity.VPD, Math.max(0.0, ew - e), true);
        }

        double solar = in.solarWm2();
        boolean solarAbsent = Double.isNaN(solar);
        if (solarAbsent) solar = 0.0;

        if (dry && !Double.isNaN(rh)) {
            ThiVariant variant = in.thiVariant();
            boolean thiWind = !variant.needsAirSpeed() || !Double.isNaN(ws);
            if (thiWind) {
                if (variant.needsAirSpeed() && solarAbsent) out.note(Note.THI_SOLAR_ASSUMED_ZERO);
                out.set(Quantity.THI, variant.index(t, rh, tw, td, ws, solar), true);
            }
            double tF = t * 1.8 + 32.0;
            double hiF = HeatIndex.fahrenheit(tF, rh);
            if (hiF < HeatIndex.REGRESSION_FROM_F) out.note(Note.HEAT_INDEX_SIMPLE);
            out.set(Quantity.HEAT_INDEX, (hiF - 32.0) / 1.8, true);
            if (!Double.isNaN(ws)) {
                if (solarAbsent) out.note(Note.SOLAR_ASSUMED_ZERO);
                if (t < Cci.MIN_C || t > Cci.MAX_C) out.note(Note.CCI_OUT_OF_RANGE);
                out.set(Quantity.CCI, Cci.celsius(t, rh, ws, solar), true);
            }
        }

        if (dry && !Double.isNaN(ws)) {
            double v10 = WindChill.penTo10mKmh(ws);
            if (t > WindChill.MAX_AIR_C) {
                out.note(Note.WIND_CHILL_WARM);
                out.set(Quantity.WIND_CHILL, t, true);
            } else if (v10 < WindChill.MIN_WIND_KMH) {
                out.note(Note.WIND_CHILL_CALM);
                out.set(Quantity.WIND_CHILL, t, true);
            } else {
                out.note(Note.WIND_CHILL_PEN_WIND);
                out.set(Quantity.WIND_CHILL, WindChill.formulaC(t, v10), true);
            }
        }

        if (!Double.isNaN(in.globeC()) && !Double.isNaN(td)) {
            out.set(Quantity.BGHI, Bghi.index(in.globeC(), td), true);
        }
        return out;
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
