package byre.cli;

import byre.config.ByreConfig;
import byre.config.SensorConfig;
import byre.ingest.Reading;
import byre.rules.ZoneReading;
import byre.units.Quantity;
import byre.units.Suggest;
import byre.units.Unit;
import java.io.BufferedReader;
import java.io.IOException;
import java.time.Instant;
import java.time.ZoneId;
import java.util.ArrayList;
import java.util.List;
import java.util.function.Consumer;

/**
 * Reads a readings CSV for replay (README, Alerts and delivery: readings CSV): header {@code time,zone,quantity,value,unit}
 * (zone streams) or {@code time,sensor,value} (raw sensor readings, in each sensor's configured unit).
 * Every bad line is reported as {@code file:line:col: message}; reading stops after 20 of them.
 */
final class ReadingsCsv {
    enum Form { ZONE, SENSOR }

    static final class BadCsv extends Exception {
        BadCsv(String message) {
            super(message);
        }
    }

    private final String name;
    private final ZoneId siteZone;
    private final ByreConfig config;
    private final List<String> problems = new ArrayList<>();
    Form form;

    ReadingsCsv(String name, ZoneId siteZone, ByreConfig config) {
        this.name = name;
        this.siteZone = siteZone;
        this.config = config;
    }

    /** Reads every line, handing zone or sensor readings to the consumers in file order. */
    void read(BufferedReader in, Consumer<ZoneReading> zones, Consumer<Reading> sensors) throws IOException, BadCsv {
        String header = in.readLine();
        if (header == null) throw new BadCsv(name + ":1:1: empty file; expected a header time,zone,quantity,value,unit or time,sensor,value");
        List<String> h = split(header.replace("\uFEFF", "").strip());
        if (h.equals(List.of("time", "zone", "quantity", "value", "unit"))) {
            form = Form.ZONE;
        } else if (h.equals(List.of("time", "sensor", "value"))) {
            form = Form.SENSOR;
            if (config == null) throw new BadCsv(name + ":1:1: time,sensor,value readings need --config (sensor units and zones come from it)");
        } else {
            throw new BadCsv(name + ":1:1: unknown header '" + header.strip() + "'; expected time,zone,quantity,value,unit or time,sensor,value");
        }
        String line;
        int n = 1;
        Instant last = Instant.MIN;
        while ((line = in.readLine()) != null) {
            n++;
            if (line.isBlank()) continue;
            List<String> f = split(line);
            int want = form == Form.ZONE ? 5 : 3;
            if (f.size() != want) {
                problem(n, 1, "expected " + want + " fields, found " + f.size());
                continue;
            }
            Instant at = TimeArg.parse(f.get(0), Instant.now(), siteZone).orElse(null);
            if (at == null) {
                problem(n, 1, "not a time: '" + f.get(0) + "' (use ISO 8601, e.g. 2026-07-14T13:05:00Z)");
                continue;
            }
            if (at.isBefore(last)) {
                problem(n, 1, "time " + f.get(0) + " is before the line above; readings must be in time order");
                continue;
            }
            last = at;
            double value;
            try {
                value = Double.parseDouble(f.get(form == Form.ZONE ? 3 : 2).strip());
            } catch (NumberFormatException e) {
                problem(n, col(line, form == Form.ZONE ? 3 : 2), "not a number: '" + f.get(form == Form.ZONE ? 3 : 2) + "'");
                continue;
            }
            if (form == Form.ZONE) {
                Quantity q = Quantity.byId(f.get(2).strip()).orElse(null);
                if (q == null) {
                    problem(n, col(line, 2), "unknown quantity '" + f.get(2) + "'" + Suggest.hint(f.get(2), Quantity.ids()));
                    continue;
                }
                String us = f.get(4).strip();
                Unit u = us.isEmpty() ? q.canonicalUnit() : Unit.bySymbol(us).orElse(null);
                if (u == null || u.dimension() != q.dimension()) {
                    problem(n, col(line, 4), "unit '" + us + "' does not fit " + q.id());
                    continue;
                }
                zones.accept(new ZoneReading(at, f.get(1).strip(), q, u.toCanonical(value)));
            } else {
                String id = f.get(1).strip();
                SensorConfig s = config.sensors().get(id);
                if (s == null) {
                    problem(n, col(line, 1), "unknown sensor '" + id + "'" + Suggest.hint(id, config.sensors().keySet()));
                    continue;
                }
                double canonical = s.unit().toCanonical(value);
                if (!s.quantity().isPlausible(canonical)) {
                    problem(n, col(line, 2), "value " + value + " " + s.unit().symbol() + " is outside the plausible range of " + s.quantity().id());
                    continue;
                }
                sensors.accept(new Reading(id, s.quantity(), canonical, at));
            }
            if (problems.size() >= 20) break;
        }
        if (!problems.isEmpty()) throw new BadCsv(String.join("\n", problems));
    }

    private void problem(int line, int col, String message) {
        problems.add(name + ":" + line + ":" + col + ": " + message);
    }

    /** 1-based column where field {@code index} starts. */
    private static int col(String line, int index) {
        int c = 0;
        for (int i = 0; i < index; i++) {
            c = line.indexOf(',', c) + 1;
            if (c == 0) return 1;
        }
        return c + 1;
    }

    /** RFC 4180 fields of one line (quotes with doubled quotes inside). */
    static List<String> split(String line) {
        List<String> out = new ArrayList<>();
        StringBuilder sb = new StringBuilder();
        boolean quoted = false;
        for (int i = 0; i < line.length(); i++) {
            char c = line.charAt(i);
            if (quoted) {
                if (c == '"' && i + 1 < line.length() && line.charAt(i + 1) == '"') {
                    sb.append('"');
                    i++;
                } else if (c == '"') {
                    quoted = false;
                } else {
                    sb.append(c);
                }
            } else if (c == '"') {
                quoted = true;
            } else if (c == ',') {
                out.add(sb.toString());
                sb.setLength(0);
            } else {
                sb.append(c);
            }
        }
        out.add(sb.toString());
        return out;
    }
}
