package byre.cli;

import byre.config.ByreConfig;
import byre.config.SensorConfig;
import byre.history.HistoryException;
import byre.history.HistoryReader;
import byre.history.StreamKey;
import byre.units.Dimension;
import byre.units.Quantity;
import byre.units.Suggest;
import byre.units.Unit;
import java.io.BufferedWriter;
import java.io.IOException;
import java.io.OutputStreamWriter;
import java.io.UncheckedIOException;
import java.io.Writer;
import java.nio.charset.StandardCharsets;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneId;
import java.time.format.DateTimeFormatter;
import java.util.Locale;
import java.util.concurrent.Callable;
import java.util.function.DoubleConsumer;
import picocli.CommandLine.Command;
import picocli.CommandLine.Mixin;
import picocli.CommandLine.Option;

/**
 * {@code byre history}: one stream of the history as a table or as CSV (RFC 4180, ISO 8601 UTC times, the site's
 * display units named in the header). Without {@code --every} the raw readings; with it min, max, mean and count per
 * bucket (built from the stored rollups when the width is whole minutes or hours).
 */
@Command(name = "history", mixinStandardHelpOptions = true, sortOptions = false,
        description = {"Query and export the history of one zone quantity or one sensor.",
                "Times: now, -24h, -7d, 2026-07-14, 2026-07-14T14:05 (site time), 2026-07-14T13:05:00Z."})
final class HistoryCommand implements Callable<Integer> {
    @Option(names = "--zone", paramLabel = "ZONE", description = "Zone id (with --quantity).") String zone;
    @Option(names = "--quantity", paramLabel = "Q", description = "Quantity, e.g. thi, dry-bulb, wind-chill.") String quantity;
    @Option(names = "--sensor", paramLabel = "SENSOR", description = "A sensor's raw readings instead of a zone stream.") String sensor;
    @Option(names = "--from", paramLabel = "TIME", defaultValue = "-24h", description = "Start (inclusive), default -24h.") String from;
    @Option(names = "--to", paramLabel = "TIME", defaultValue = "now", description = "End (exclusive), default now.") String to;
    @Option(names = "--every", paramLabel = "DURATION", description = "Bucket width (15m, 1h, 1d): min, max, mean, count per bucket.") String every;
    @Option(names = "--csv", description = "CSV (RFC 4180) instead of a table.") boolean csv;
    @Mixin ConfigOption config;

    /** A resolved query: what, which column header, over when. */
    record Query(StreamKey key, Quantity quantity, Unit unit, String label, Instant from, Instant to, Duration every) {}

    static final class BadQuery extends Exception {
        BadQuery(String message) { super(message); }
    }

    @Override
    public Integer call() {
        ByreConfig cfg = config.load(System.err);
        if (cfg == null) return Main.USAGE;
        Query q;
        try {
            q = resolve(byre.central.FoundSites.readStored(cfg), zone, quantity, sensor, from, to, every, Clock.systemUTC().instant());
        } catch (BadQuery e) {
            System.err.println("byre: " + e.getMessage());
            return Main.USAGE;
        }
        // A running daemon holds the zone rows of the last minutes in memory (they wait for the rollups): ask it to
        // write them first. Raw sensor readings are committed within seconds anyway.
        if (q.key().kind() == byre.history.StreamKey.Kind.ZONE && cfg.admin().enabled()) new AdminClient(cfg.admin()).writeHistory();
        Writer out = new BufferedWriter(new OutputStreamWriter(System.out, StandardCharsets.UTF_8), 1 << 16);
        ProgressBar bar = ProgressBar.forStderr();
        try (HistoryReader r = HistoryReader.openReadOnly(cfg.history().path())) {
            long n = export(r, q, csv, cfg.timezone(), out, bar);
            out.flush();
            bar.done();
            if (n == 0) System.err.println("byre: no readings of " + q.key().name() + " in that time range");
            return Main.OK;
        } catch (HistoryException e) {
            bar.done();
            System.err.println("byre: " + e.getMessage());
            return Main.FAILURE;
        } catch (IOException | UncheckedIOException e) {
            return Main.FAILURE; // output closed (e.g. piped into head): nothing more to say
        }
    }

    static Query resolve(ByreConfig cfg, String zone, String quantity, String sensor, String from, String to, String every, Instant now)
            throws BadQuery {
        boolean us = cfg.units() == ByreConfig.DisplayUnits.US;
        StreamKey key;
        Quantity q;
        String name;
        if (sensor != null) {
            if (zone != null || quantity != null) throw new BadQuery("give either --sensor, or --zone with --quantity, not both");
            SensorConfig s = cfg.sensors().get(sensor);
            if (s == null) {
                SensorConfig family = cfg.sensors().values().stream().filter(f -> f.isFamily() && sensor.startsWith(f.id() + "/")).findFirst().orElse(null);
                if (family == null) {
                    throw new BadQuery("unknown sensor '" + sensor + "'" + Suggest.hint(sensor, cfg.sensors().keySet())
                            + "; known: " + String.join(", ", cfg.sensors().keySet()));
                }
                s = family;
            }
            key = StreamKey.sensor(sensor);
            q = s.quantity();
            name = sensor;
        } else {
            if (zone == null || quantity == null) throw new BadQuery("give --zone and --quantity (or --sensor)");
            if (!cfg.zones().containsKey(zone)) {
                throw new BadQuery("unknown zone '" + zone + "'" + Suggest.hint(zone, cfg.zones().keySet())
                        + "; known: " + String.join(", ", cfg.zones().keySet()));
            }
            q = Quantity.byId(quantity).orElseThrow(() -> new BadQuery("unknown quantity '" + quantity + "'"
                    + Suggest.hint(quantity, Quantity.ids()) + "; known: " + String.join(", ", Quantity.ids())));
            key = StreamKey.zone(zone, q);
            // A central zone's every value as its site published it (the zone stream is stored once a minute).
            if (cfg.central().isMirroredZone(zone)) key = StreamKey.sensor(byre.config.CentralSettings.mirrorSensor(zone, q));
            if (cfg.central().isSiteZone(zone) && q == Quantity.ONLINE) key = StreamKey.sensor(byre.config.CentralSettings.onlineSensor(zone));
            name = q.id();
        }
        Unit unit = CalcCommand.displayUnit(q, us);
        String label = name + unitLabel(unit);
        Instant f = TimeArg.parse(from, now, cfg.timezone()).orElseThrow(() -> new BadQuery("--from " + from + ": " + TimeArg.help()));
        Instant t = TimeArg.parse(to, now, cfg.timezone()).orElseThrow(() -> new BadQuery("--to " + to + ": " + TimeArg.help()));
        if (!f.isBefore(t)) throw new BadQuery("--from " + from + " is not before --to " + to);
        Duration e = null;
        if (every != null) {
            e = TimeArg.positive(every);
            if (e == null) throw new BadQuery("--every " + every + ": use a width such as 15m, 1h or 1d");
        }
        return new Query(key, q, unit, label, f, t, e);
    }

    /** " (degC)", " (%)", "" for a unitless index. Temperatures say deg so that a spreadsheet reader cannot mistake C. */
    static String unitLabel(Unit u) {
        if (u.dimension() == Dimension.INDEX || u.symbol().isEmpty()) return "";
        return " (" + (u.dimension() == Dimension.TEMPERATURE ? "deg" + u.symbol() : u.symbol()) + ")";
    }

    /** Writes the rows; returns how many. {@code progress} receives the fraction of the time range covered so far. */
    static long export(HistoryReader r, Query q, boolean csv, ZoneId zone, Writer out, DoubleConsumer progress) throws IOException {
        long[] n = {0};
        double span = Duration.between(q.from(), q.to()).toMillis();
        DateTimeFormatter local = DateTimeFormatter.ofPattern("yyyy-MM-dd HH:mm:ss", Locale.ROOT).withZone(zone);
        String timeHead = (q.every() == null ? "time (" : "start (") + zone.getId() + ")";
        String tf = "%-" + Math.max(19, timeHead.length()) + "s";
        if (q.every() == null) {
            out.write(csv ? Csv.row("time", q.label()) : String.format(Locale.ROOT, tf + "  %12s%n", timeHead, q.label()));
            r.forEachRaw(q.key(), q.from(), q.to(), row -> {
                String v = value(q, row.value());
                write(out, csv ? Csv.row(row.at().toString(), v) : String.format(Locale.ROOT, tf + "  %12s%n", local.format(row.at()), v));
                if ((++n[0] & 1023) == 0) progress.accept(Duration.between(q.from(), row.at()).toMillis() / span);
            });
        } else {
            String[] head = {"time", name(q, "min"), name(q, "max"), name(q, "mean"), "count"};
            out.write(csv ? Csv.row(head) : String.format(Locale.ROOT, tf + "  %12s %12s %12s %7s%n", timeHead,
                    "min", "max", "mean", "count"));
            r.forEachBucket(q.key(), q.every(), q.from(), q.to(), b -> {
                String[] cells = {value(q, b.min()), value(q, b.max()), value(q, b.mean()), Long.toString(b.count())};
                write(out, csv ? Csv.row(b.start().toString(), cells[0], cells[1], cells[2], cells[3])
                        : String.format(Locale.ROOT, tf + "  %12s %12s %12s %7s%n", local.format(b.start()), cells[0], cells[1], cells[2], cells[3]));
                if ((++n[0] & 63) == 0) progress.accept(Duration.between(q.from(), b.start()).toMillis() / span);
            });
            if (!csv) out.write("(" + q.label() + ")" + System.lineSeparator());
        }
        return n[0];
    }

    private static String name(Query q, String stat) {
        String u = unitLabel(q.unit());
        String base = q.label().substring(0, q.label().length() - u.length());
        return base + " " + stat + u;
    }

    /** The value in the display unit, at most 4 decimals, no trailing zeros. */
    static String value(Query q, double canonical) {
        double v = q.unit().fromCanonical(canonical);
        String s = new java.math.BigDecimal(v).setScale(4, java.math.RoundingMode.HALF_EVEN).stripTrailingZeros().toPlainString();
        return s.equals("-0") ? "0" : s;
    }

    private static void write(Writer out, String s) {
        try {
            out.write(s);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /** A one-line progress bar on standard error, shown only when there is a terminal and the export takes a while. */
    static final class ProgressBar implements DoubleConsumer {
        private final boolean on;
        private final long startNanos = System.nanoTime();
        private long lastNanos;
        private boolean drawn;

        private ProgressBar(boolean on) {
            this.on = on;
        }

        static ProgressBar forStderr() {
            return new ProgressBar(Terminal.isTty(2));
        }

        @Override
        public void accept(double fraction) {
            if (!on) return;
            long now = System.nanoTime();
            if (now - startNanos < 500_000_000L || now - lastNanos < 100_000_000L) return;
            lastNanos = now;
            int width = 30;
            int filled = (int) Math.round(Math.max(0, Math.min(1, fraction)) * width);
            System.err.print("\rexporting [" + "#".repeat(filled) + " ".repeat(width - filled) + "] "
                    + Math.round(Math.max(0, Math.min(1, fraction)) * 100) + "%");
            drawn = true;
        }

        void done() {
            if (drawn) System.err.print("\r" + " ".repeat(50) + "\r");
            drawn = false;
        }
    }
}
