package byre.cli;

import byre.climate.ClimateInputs;
import byre.climate.Derivable;
import byre.climate.DerivedClimate;
import byre.climate.Note;
import byre.climate.Psychrometer;
import byre.climate.ThiScale;
import byre.climate.ThiVariant;
import byre.climate.ZoneClimate;
import byre.units.Dimension;
import byre.units.Quantity;
import byre.units.Suggest;
import byre.units.Unit;
import java.io.PrintStream;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.concurrent.Callable;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import picocli.CommandLine.ArgGroup;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

/** {@code byre calc}: every derived value for one set of conditions. */
@Command(name = "calc", mixinStandardHelpOptions = true, sortOptions = false,
        description = {"Every derived value for one set of conditions.",
                "Values carry their unit: 30C 86F 303.15K, 2m/s 7km/h 400ft/min, 98.5kPa 29.1inHg, 240m 787ft.",
                "A number without a unit is taken in the --units system (metric: C, m/s, kPa, m; us: F, ft/min, inHg, ft)."})
final class CalcCommand implements Callable<Integer> {

    @Option(names = "--dry-bulb", required = true, paramLabel = "TEMP", description = "Air (dry-bulb) temperature, e.g. 30C or 86F.")
    String dryBulb;

    @ArgGroup(exclusive = true, multiplicity = "1")
    Humidity humidity;

    static final class Humidity {
        @Option(names = "--wet-bulb", paramLabel = "TEMP", description = "Psychrometer wet-bulb temperature.") String wetBulb;
        @Option(names = "--rh", paramLabel = "PERCENT", description = "Relative humidity over water, 0-100 %.") String rh;
    }

    @Option(names = "--air-speed", paramLabel = "SPEED", description = "Air speed at animal height, e.g. 2m/s or 400ft/min.")
    String airSpeed;

    @Option(names = "--solar", paramLabel = "W/M2", description = "Solar irradiance in W/m2 (default 0: indoors).")
    String solar;

    @Option(names = "--globe", paramLabel = "TEMP", description = "Black-globe temperature.")
    String globe;

    @ArgGroup(exclusive = true, multiplicity = "0..1")
    Altitude altitude;

    static final class Altitude {
        @Option(names = "--elevation", paramLabel = "HEIGHT", description = "Elevation of the barn, e.g. 240m or 787ft.") String elevation;
        @Option(names = "--pressure", paramLabel = "PRESSURE", description = "Measured station pressure, e.g. 98.5kPa or 29.1inHg.") String pressure;
    }

    @Option(names = "--psychrometer", paramLabel = "TYPE", defaultValue = "aspirated",
            description = "aspirated (default) or screen (naturally ventilated).")
    String psychrometer;

    @Option(names = "--thi-variant", paramLabel = "FORM", defaultValue = "nrc-1971",
            description = "nrc-1971 (default), thom-wet-bulb, dew-point, mader-2006, mader-2006-adjusted.")
    String thiVariant;

    @Option(names = "--units", paramLabel = "SYSTEM", defaultValue = "metric", description = "metric (default) or us, for display and bare numbers.")
    String units;

    @Option(names = "--json", description = "One JSON object keyed by quantity, canonical units, null where missing.")
    boolean json;

    /** Bad input from the user: message for standard error, exit code 2. */
    static final class BadInput extends Exception {
        BadInput(String message) { super(message); }
    }

    @Override
    public Integer call() {
        PrintStream out = System.out;
        try {
            boolean us = parseUnits();
            ClimateInputs in = inputs(us);
            DerivedClimate d = ZoneClimate.derive(in);
            if (d.hasProblems()) {
                for (String p : d.problems()) System.err.println("byre: " + p);
                return Main.USAGE;
            }
            out.print(json ? json(d) : table(d, us));
            return Main.OK;
        } catch (BadInput e) {
            System.err.println("byre: " + e.getMessage());
            return Main.USAGE;
        }
    }

    private boolean parseUnits() throws BadInput {
        if (units.equalsIgnoreCase("metric")) return false;
        if (units.equalsIgnoreCase("us")) return true;
        throw new BadInput("--units " + units + ": use metric or us" + Suggest.hint(units, List.of("metric", "us")));
    }

    ClimateInputs inputs(boolean us) throws BadInput {
        ClimateInputs.Builder b = ClimateInputs.builder();
        b.dryBulbC(measure("--dry-bulb", dryBulb, Quantity.DRY_BULB, us ? Unit.F : Unit.C));
        if (humidity.wetBulb != null) b.wetBulbC(measure("--wet-bulb", humidity.wetBulb, Quantity.WET_BULB, us ? Unit.F : Unit.C));
        if (humidity.rh != null) {
            double rh = measure("--rh", humidity.rh, null, Unit.PERCENT);
            if (rh < 0 || rh > 100) throw new BadInput("--rh " + humidity.rh + ": relative humidity must be within 0-100 %");
            b.rhPercent(rh);
        }
        if (airSpeed != null) {
            double v = measure("--air-speed", airSpeed, null, us ? Unit.FT_PER_MIN : Unit.M_PER_S);
            if (v < 0) throw new BadInput("--air-speed " + airSpeed + ": air speed cannot be negative");
            b.airSpeedMps(v);
        }
        if (solar != null) b.solarWm2(measure("--solar", solar, Quantity.SOLAR, Unit.W_PER_M2));
        if (globe != null) b.globeC(measure("--globe", globe, Quantity.GLOBE, us ? Unit.F : Unit.C));
        if (altitude != null && altitude.pressure != null) {
            b.pressureKPa(measure("--pressure", altitude.pressure, Quantity.PRESSURE, us ? Unit.INHG : Unit.KPA));
        }
        if (altitude != null && altitude.elevation != null) b.elevationM(elevation(altitude.elevation, us));
        Psychrometer p = Psychrometer.byId(psychrometer);
        if (p == null) {
            throw new BadInput("--psychrometer " + psychrometer + ": use aspirated or screen"
                    + Suggest.hint(psychrometer, List.of("aspirated", "screen")));
        }
        b.psychrometer(p);
        ThiVariant v = ThiVariant.byId(thiVariant);
        if (v == null) {
            List<String> ids = Arrays.stream(ThiVariant.values()).map(ThiVariant::id).toList();
            throw new BadInput("--thi-variant " + thiVariant + ": use one of " + String.join(", ", ids) + Suggest.hint(thiVariant, ids));
        }
        b.thiVariant(v);
        return b.build();
    }

    private static final Pattern VALUE = Pattern.compile("\\s*([-+]?(?:\\d+\\.?\\d*|\\.\\d+)(?:[eE][-+]?\\d+)?)\\s*(.*?)\\s*");

    /** Parses "30C" into the canonical unit of the unit's dimension; checks dimension and plausibility. */
    static double measure(String option, String text, Quantity quantity, Unit defaultUnit) throws BadInput {
        Matcher m = VALUE.matcher(text);
        if (!m.matches()) throw new BadInput(option + " " + text + ": expected a number with a unit, e.g. " + example(defaultUnit));
        double number = Double.parseDouble(m.group(1));
        String symbol = m.group(2);
        Dimension dim = defaultUnit.dimension();
        Unit unit = defaultUnit;
        if (!symbol.isEmpty()) {
            List<String> allowed = Arrays.stream(Unit.values()).filter(u -> u.dimension() == dim)
                    .map(Unit::symbol).toList();
            unit = Unit.bySymbol(symbol).filter(u -> u.dimension() == dim).orElseThrow(() -> new BadInput(
                    option + " " + text + ": unknown unit '" + symbol + "' here; use " + String.join(", ", allowed)
                            + Suggest.hint(symbol, allowed)));
        }
        double canonical = unit.toCanonical(number);
        if (quantity != null && !quantity.isPlausible(canonical)) {
            throw new BadInput(String.format(Locale.ROOT, "%s %s: %s %s is outside the plausible %s..%s %s%s", option, text,
                    fmt(canonical, 2), dim.canonicalSymbol(), fmt(quantity.plausibleMin(), 0), fmt(quantity.plausibleMax(), 0),
                    dim.canonicalSymbol(), symbol.isEmpty() ? " (write the unit, e.g. " + example(defaultUnit) + ")" : ""));
        }
        return canonical;
    }

    private static String example(Unit u) {
        return switch (u.dimension()) {
            case TEMPERATURE -> "30C or 86F";
            case SPEED -> "2m/s or 400ft/min";
            case PRESSURE -> "98.5kPa or 29.1inHg";
            case RELATIVE_HUMIDITY, IRRADIANCE, HUMIDITY_RATIO, ENTHALPY, INDEX -> "60" + u.symbol();
        };
    }

    static double elevation(String text, boolean us) throws BadInput {
        Matcher m = VALUE.matcher(text);
        if (!m.matches()) throw new BadInput("--elevation " + text + ": expected a height, e.g. 240m or 787ft");
        double number = Double.parseDouble(m.group(1));
        String symbol = m.group(2);
        double metres;
        if (symbol.equals("m") || (symbol.isEmpty() && !us)) metres = number;
        else if (symbol.equals("ft") || symbol.isEmpty()) metres = number * 0.3048;
        else throw new BadInput("--elevation " + text + ": unknown unit '" + symbol + "' here; use m or ft"
                    + Suggest.hint(symbol, List.of("m", "ft")));
        if (metres < -500 || metres > 6000) throw new BadInput("--elevation " + text + ": outside -500..6000 m");
        return metres;
    }

    static String json(DerivedClimate d) {
        StringBuilder sb = new StringBuilder("{");
        for (Quantity q : Quantity.values()) {
            if (!q.climate()) continue;
            if (sb.length() > 1) sb.append(',');
            sb.append('"').append(q.id()).append("\":");
            double v = d.value(q);
            sb.append(Double.isNaN(v) ? "null" : new java.math.BigDecimal(fmt(v, 4)).stripTrailingZeros().toPlainString());
        }
        return sb.append("}\n").toString();
    }

    static Unit displayUnit(Quantity q, boolean us) {
        Unit canonical = q.canonicalUnit();
        if (!us) return canonical;
        return switch (q.dimension()) {
            case TEMPERATURE -> Unit.F;
            case SPEED -> Unit.FT_PER_MIN;
            case PRESSURE -> q == Quantity.VPD ? Unit.KPA : Unit.INHG;
            case RELATIVE_HUMIDITY, IRRADIANCE, HUMIDITY_RATIO, ENTHALPY, INDEX -> canonical;
        };
    }

    static String table(DerivedClimate d, boolean us) {
        StringBuilder sb = new StringBuilder();
        sb.append(String.format(Locale.ROOT, "%-15s %9s  %-7s %s%n", "quantity", "value", "unit", "method"));
        Map<String, List<String>> missing = new LinkedHashMap<>();
        for (Quantity q : Quantity.values()) {
            if (!q.climate()) continue;
            Unit u = displayUnit(q, us);
            double v = d.value(q);
            String value;
            if (Double.isNaN(v)) {
                value = "-";
                // What a derived quantity lacks, from the recipe table the derivation ran; a measured-only one says "not given".
                List<String> need = d.missingInputs(q);
                if (!need.isEmpty() && Derivable.hasRecipe(q)) missing.computeIfAbsent(needText(need), k -> new ArrayList<>()).add(q.id());
            } else {
                int decimals = byre.alerts.EventText.decimals(q); // the same decimals as event JSON
                if (u == Unit.FT_PER_MIN) decimals = 0;
                if (u == Unit.INHG) decimals = 2;
                value = fmt(u.fromCanonical(v), decimals);
            }
            String method = Double.isNaN(v) && q.measurable() && !d.isDerived(q) && d.method(q).equals("measured")
                    ? (q == Quantity.SOLAR ? "not given (0 W/m2 assumed)" : "not given") : d.method(q);
            if (q == Quantity.SOLAR && Double.isNaN(v)) method = "not given (0 W/m2 assumed)";
            if (q == Quantity.THI && !Double.isNaN(v)) {
                method += String.format(Locale.ROOT, "; LWSI: %s; dairy (Zimbelman 2009): %s",
                        d.thiCategory(ThiScale.LWSI), d.thiCategory(ThiScale.DAIRY));
            }
            sb.append(String.format(Locale.ROOT, "%-15s %9s  %-7s %s%n", q.id(), value, u.symbol(), method));
        }
        if (!missing.isEmpty()) {
            List<String> parts = new ArrayList<>();
            missing.forEach((need, qs) -> parts.add(String.join(", ", qs) + ": need " + need));
            sb.append("\nmissing: ").append(String.join("; ", parts)).append('\n');
        }
        List<Note> notes = d.notes();
        if (!notes.isEmpty()) {
            sb.append("\nnotes:\n");
            for (Note n : notes) sb.append("  ").append(n.text()).append('\n');
        }
        return sb.toString();
    }

    private static String needText(List<String> need) {
        List<String> flags = new ArrayList<>();
        for (String n : need) flags.add("--" + n.replace(" or ", " or --"));
        return String.join(" and ", flags);
    }

    static String fmt(double v, int decimals) {
        String s = String.format(Locale.ROOT, "%." + decimals + "f", v);
        if (s.startsWith("-") && Double.parseDouble(s) == 0) s = s.substring(1);
        return s;
    }
}
