package byre.zones;

import byre.climate.ClimateInputs;
import byre.climate.DerivedClimate;
import byre.climate.Psychrometer;
import byre.climate.ThiVariant;
import byre.climate.ZoneClimate;
import byre.config.ZoneConfig;
import byre.units.Quantity;

/** Zone derivation with the published methods of {@link ZoneClimate}. */
public final class ClimateDeriver implements ZoneDeriver {
    @Override
    public String derive(ZoneConfig zone, double[] in, double[] out) {
        ClimateInputs inputs = ClimateInputs.builder()
                .dryBulbC(in[Quantity.DRY_BULB.ordinal()])
                .wetBulbC(in[Quantity.WET_BULB.ordinal()])
                .rhPercent(in[Quantity.RH.ordinal()])
                .dewPointC(in[Quantity.DEW_POINT.ordinal()])
                .airSpeedMps(in[Quantity.AIR_SPEED.ordinal()])
                .solarWm2(in[Quantity.SOLAR.ordinal()])
                .globeC(in[Quantity.GLOBE.ordinal()])
                .pressureKPa(in[Quantity.PRESSURE.ordinal()])
                .elevationM(zone.elevationM())
                .psychrometer(zone.psychrometer() == ZoneConfig.Psychrometer.SCREEN ? Psychrometer.SCREEN : Psychrometer.ASPIRATED)
                .thiVariant(ThiVariant.byId(zone.thiVariant()))
                .build();
        DerivedClimate d = ZoneClimate.derive(inputs);
        for (Quantity q : Quantity.values()) {
            out[q.ordinal()] = d.isDerived(q) || q.measurable() == false ? d.value(q) : Double.NaN;
        }
        return d.hasProblems() ? String.join("; ", d.problems()) : null;
    }
}
