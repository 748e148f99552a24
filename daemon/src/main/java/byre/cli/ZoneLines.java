package byre.cli;

import byre.alerts.EventText;
import byre.climate.HeatIndex;
import byre.config.ByreConfig;
import byre.daemon.Pipeline;
import byre.rules.ZoneReading;
import byre.rules.eval.MessageText;
import byre.units.Quantity;
import byre.units.Unit;
import java.io.PrintStream;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneId;
import java.time.format.DateTimeFormatter;
import java.util.EnumMap;
import java.util.LinkedHashMap;
import java.util.Locale;
import java.util.Map;

/**
 * One live line per zone on the console (the demo): the zone's current values in the site's units,
 * printed every {@code every} of (possibly simulated) time; wind chill and heat index only when they add something.
 */
final class ZoneLines implements Pipeline.ZoneListener {
    private static final Quantity[] SHOWN = {Quantity.DRY_BULB, Quantity.RH, Quantity.AIR_SPEED, Quantity.DEW_POINT,
            Quantity.WIND_CHILL, Quantity.HEAT_INDEX, Quantity.THI};
    private static final DateTimeFormatter CLOCK = DateTimeFormatter.ofPattern("EEE HH:mm", Locale.ROOT);

    /** 80 F: below it the NWS heat index is the simple formula, close to the air temperature. */
    static final double HEAT_INDEX_FROM_C = (HeatIndex.REGRESSION_FROM_F - 32.0) / 1.8;

    private final PrintStream out;
    private final Duration every;
    private final ZoneId zone;
    private final boolean us;
    private final Map<String, Map<Quantity, Double>> latest = new LinkedHashMap<>();
    private Instant nextPrint;

    ZoneLines(ByreConfig config, PrintStream out, Duration every) {
        this.out = out;
        this.every = every;
        this.zone = config.timezone();
        this.us = config.units() == ByreConfig.DisplayUnits.US;
        for (String z : config.zones().keySet()) latest.put(z, new EnumMap<>(Quantity.class));
    }

    @Override
    public void accept(ZoneReading r) {
        Map<Quantity, Double> m = latest.get(r.zone());
        if (m != null) m.put(r.quantity(), r.value());
    }

    /** The next lines are due then; the first tick comes at the pipeline's first turn. */
    @Override
    public Instant nextTick(Instant now) {
        return nextPrint == null ? now : nextPrint;
    }

    @Override
    public void tick(Instant now) {
        if (nextPrint == null) nextPrint = now.plus(every);
        if (now.isBefore(nextPrint)) return;
        nextPrint = now.plus(every);
        for (Map.Entry<String, Map<Quantity, Double>> e : latest.entrySet()) {
            if (e.getValue().isEmpty()) continue;
            out.println(line(CLOCK.format(now.atZone(zone)), e.getKey(), e.getValue()));
        }
        out.flush();
    }

    String line(String time, String zoneId, Map<Quantity, Double> values) {
        StringBuilder sb = new StringBuilder(String.format(Locale.ROOT, "%s  %-11s", time, zoneId));
        for (Quantity q : SHOWN) {
            Double v = values.get(q);
            if (v == null || !matters(q, v, values)) continue;
            Unit u = displayUnit(q);
            sb.append(String.format(Locale.ROOT, "  %s %s%s", label(q), shown(v, u), u.symbol().isEmpty() ? "" : " " + u.symbol()));
            // the band in the words of the alert messages ("THI 76.3, alert band"), never a bare "(alert)"
            String band = EventText.band(q, v);
            if (band != null) sb.append(", ").append(band);
        }
        return sb.toString();
    }

    /**
     * Whether a value says something at this moment: wind chill only when it differs from the air temperature
     * as shown (NWS wind chill equals the air temperature outside its range: above 10 C or in calm air), the
     * heat index only from 80 F (26.7 C) air temperature, where the NWS heat index starts to apply (Rothfusz 1990).
     */
    private boolean matters(Quantity q, double v, Map<Quantity, Double> values) {
        Double air = values.get(Quantity.DRY_BULB);
        switch (q) {
            case WIND_CHILL:
                return air == null || !shown(v, displayUnit(q)).equals(shown(air, displayUnit(Quantity.DRY_BULB)));
            case HEAT_INDEX:
                return (air != null ? air : v) >= HEAT_INDEX_FROM_C;
            default:
                return true;
        }
    }

    private static String shown(double canonical, Unit u) {
        return MessageText.value(canonical, u);
    }

    private Unit displayUnit(Quantity q) {
        if (!us) return q.canonicalUnit();
        return switch (q.dimension()) {
            case TEMPERATURE -> Unit.F;
            case SPEED -> Unit.MPH;
            case PRESSURE -> Unit.INHG;
            case RELATIVE_HUMIDITY, IRRADIANCE, HUMIDITY_RATIO, ENTHALPY, INDEX -> q.canonicalUnit();
        };
    }

    private static String label(Quantity q) {
        return switch (q) {
            case DRY_BULB -> "air";
            case AIR_SPEED -> "wind";
            case DEW_POINT -> "dew";
            case WIND_CHILL -> "chill";
            case HEAT_INDEX -> "heat-index";
            case THI -> "THI";
            case WET_BULB, RH, SOLAR, GLOBE, PRESSURE, HUMIDITY_RATIO, ENTHALPY, VPD, CCI, BGHI, ONLINE -> q.id();
        };
    }
}
