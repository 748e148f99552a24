package byre.cli;

import byre.alerts.AlertEvent;
import byre.config.ByreConfig;
import byre.config.ConfigException;
import byre.config.ConfigLoader;
import byre.config.ConfigProblem;
import byre.config.SensorConfig;
import byre.daemon.ConfigRuleContext;
import byre.daemon.Freshness;
import byre.daemon.ReportingIntervals;
import byre.daemon.Replay;
import byre.daemon.RuleFiles;
import byre.history.HistoryReader;
import byre.history.HistoryStore;
import byre.history.StreamKey;
import byre.ingest.Reading;
import byre.notify.ChannelTypes;
import byre.rules.CompileResult;
import byre.rules.RuleCompiler;
import byre.rules.RuleContext;
import byre.rules.RuleSet;
import byre.rules.RuleSource;
import byre.rules.ZoneReading;
import byre.units.Quantity;
import byre.zones.ClimateDeriver;
import java.io.BufferedReader;
import java.io.IOException;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Instant;
import java.time.ZoneId;
import java.time.format.DateTimeFormatter;
import java.util.AbstractSet;
import java.util.ArrayList;
import java.util.Collections;
import java.util.Iterator;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Set;
import java.util.concurrent.Callable;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

/**
 * {@code byre replay}: what the watches would have sent over recorded readings, in order, with
 * their times. The same engine, derivation and incident logic as the live daemon.
 */
@Command(name = "replay", mixinStandardHelpOptions = true,
        description = {"Run watches over a readings CSV or the history and print the events they would have sent.",
                "CSV header: time,zone,quantity,value,unit (zone streams) or time,sensor,value (raw, needs --config)."})
final class ReplayCommand implements Callable<Integer> {
    private static final DateTimeFormatter WHEN = DateTimeFormatter.ofPattern("yyyy-MM-dd HH:mm:ss", Locale.ROOT);

    @Option(names = "--rules", required = true, arity = "1..*", paramLabel = "F", description = "Rule files or folders.")
    List<Path> rules;

    @Option(names = "--readings", paramLabel = "F.csv", description = "Readings to replay.")
    Path readings;

    @Option(names = "--from", paramLabel = "T", description = "Replay the history from T (ISO 8601, or -7d).")
    String from;

    @Option(names = "--to", paramLabel = "T", description = "... to T (default now).")
    String to;

    @Option(names = "--config", paramLabel = "F", description = "Configuration (default: $BYRE_CONFIG; needed for the history and for time,sensor,value CSV).")
    Path configFile;

    @Option(names = "--json", description = "One event object per line (the event JSON of the README).")
    boolean json;

    @Override
    public Integer call() throws Exception {
        PrintStream out = System.out;
        if ((readings == null) == (from == null)) {
            System.err.println("byre replay: give either --readings F.csv or --from T [--to T]");
            return Main.USAGE;
        }
        ByreConfig config = null;
        Path cfgPath = configFile != null ? configFile : ConfigOption.fromEnvironment();
        if (cfgPath != null) {
            try {
                config = ConfigLoader.load(cfgPath, ChannelTypes.ALL);
            } catch (ConfigException e) {
                for (ConfigProblem p : e.problems()) System.err.println(p);
                return Main.USAGE;
            }
        } else if (from != null) {
            System.err.println("byre replay: replaying the history needs --config (it names the database and the zones)");
            return Main.USAGE;
        }
        ZoneId zone = config != null ? config.timezone() : ZoneId.systemDefault();

        // Zone CSV without a configuration: the zones are whatever the file names.
        List<ZoneReading> zoneRows = new ArrayList<>();
        List<Reading> sensorRows = new ArrayList<>();
        if (readings != null) {
            ReadingsCsv csv = new ReadingsCsv(readings.toString(), zone, config);
            try (BufferedReader in = Files.newBufferedReader(readings, StandardCharsets.UTF_8)) {
                csv.read(in, zoneRows::add, sensorRows::add);
            } catch (ReadingsCsv.BadCsv e) {
                System.err.println(e.getMessage());
                return Main.USAGE;
            } catch (IOException e) {
                System.err.println("byre replay: cannot read " + readings + ": " + e.getMessage());
                return Main.USAGE;
            }
        }
        // Max-ages as the daemon would have them: zones without one follow how often their streams report,
        // learnt from the readings replayed (or, for the history, from its last day before the end).
        List<Freshness.StreamInterval> intervals = new ArrayList<>();
        Map<String, java.time.Duration> sensorIntervals = Map.of();
        if (config != null && !sensorRows.isEmpty()) {
            sensorIntervals = medianGaps(sensorRows, Reading::sensorId, Reading::at);
        } else if (config != null && readings == null) {
            Instant endGuess = to == null ? Instant.now() : TimeArg.parse(to, Instant.now(), zone).orElse(Instant.now());
            sensorIntervals = ReportingIntervals.sensorsFromHistory(config, endGuess);
        }
        if (config != null) intervals.addAll(Freshness.ofSensors(config, sensorIntervals));
        medianGaps(zoneRows, r -> r.zone() + "\t" + r.quantity().id(), ZoneReading::at).forEach((k, d) -> {
            String z = k.substring(0, k.indexOf('\t'));
            intervals.add(new Freshness.StreamInterval(z, z + "." + k.substring(k.indexOf('\t') + 1), d));
        });
        ByreConfig learnt = config == null ? null : Freshness.resolve(config, intervals);
        if (learnt != null) {
            for (String w : Freshness.warnings(learnt, intervals)) System.err.println("byre replay: warning: " + w);
        }
        RuleContext ctx = learnt != null ? new ConfigRuleContext(learnt, ReportingIntervals.byZone(config, sensorIntervals))
                : csvContext(zoneRows, Freshness.learntByZone(intervals));
        List<RuleSource> sources;
        try {
            sources = RuleFiles.read(rules);
        } catch (IOException e) {
            System.err.println("byre replay: " + e.getMessage());
            return Main.USAGE;
        }
        CompileResult compiled = RuleCompiler.compile(sources, ctx);
        if (!compiled.diagnostics().isEmpty()) System.err.println(compiled.render() + "\n");
        if (compiled.hasErrors()) return Main.USAGE;
        RuleSet ruleSet = compiled.ruleSet().orElseThrow();

        Replay replay = new Replay(ruleSet, zone, config != null ? config.site() : "replay",
                learnt != null ? new ArrayList<>(learnt.zones().values()) : null,
                config != null ? byre.central.CentralDeriver.wrap(config.central(), new ClimateDeriver()) : new ClimateDeriver(),
                config != null && config.units() == ByreConfig.DisplayUnits.US);
        List<AlertEvent> events = new ArrayList<>();
        Instant end;
        if (readings != null) {
            for (ZoneReading r : zoneRows) events.addAll(replay.zoneReading(r));
            for (Reading r : sensorRows) events.addAll(replay.sensorReading(r));
            end = zoneRows.isEmpty() ? (sensorRows.isEmpty() ? null : sensorRows.get(sensorRows.size() - 1).at())
                    : zoneRows.get(zoneRows.size() - 1).at();
        } else {
            Instant now = Instant.now();
            Instant start = TimeArg.parse(from, now, zone).orElse(null);
            end = to == null ? now : TimeArg.parse(to, now, zone).orElse(null);
            if (start == null || end == null || !start.isBefore(end)) {
                System.err.println("byre replay: --from and --to must be times (ISO 8601 or -7d) with from before to");
                return Main.USAGE;
            }
            List<StreamKey> keys = new ArrayList<>();
            for (SensorConfig s : config.sensors().values()) keys.add(StreamKey.sensor(s.id()));
            Map<String, SensorConfig> sensors = config.sensors();
            try (HistoryStore store = HistoryStore.open(config.history().path()); HistoryReader reader = store.openReader()) {
                reader.forEachRawInTimeOrder(keys, start, end, row -> {
                    SensorConfig s = sensors.get(row.stream().name());
                    if (s != null) events.addAll(replay.sensorReading(new Reading(s.id(), s.quantity(), row.value(), row.at())));
                });
            }
        }
        if (end != null) events.addAll(replay.advanceTo(end));
        for (AlertEvent e : events) {
            out.println(json ? e.toJson() : WHEN.format(e.at().atZone(zone)) + "  " + e.headline());
        }
        if (!json) System.err.printf("byre replay: %d event%s from %d watch%s.%n", events.size(), events.size() == 1 ? "" : "s",
                ruleSet.watches().size(), ruleSet.watches().size() == 1 ? "" : "es");
        List<String> noData = replay.noDataLines(end);
        if (!noData.isEmpty()) {
            System.err.println("byre replay: share of the replayed time each watch had no data for a term (no reading within its zone's max-age):");
            noData.forEach(System.err::println);
        }
        return Main.OK;
    }

    /** The median gap between each key's successive times (readings in time order); keys with too few left out. */
    static <T> Map<String, java.time.Duration> medianGaps(List<T> rows, java.util.function.Function<T, String> key,
                                                         java.util.function.Function<T, Instant> at) {
        final class Times {
            long[] ms = new long[16];
            int n;
        }
        Map<String, Times> times = new java.util.LinkedHashMap<>();
        for (T r : rows) {
            Times t = times.computeIfAbsent(key.apply(r), k -> new Times());
            if (t.n == t.ms.length) t.ms = java.util.Arrays.copyOf(t.ms, t.n * 2);
            t.ms[t.n++] = at.apply(r).toEpochMilli();
        }
        Map<String, java.time.Duration> out = new java.util.LinkedHashMap<>();
        times.forEach((k, t) -> {
            java.time.Duration d = ReportingIntervals.medianGap(t.ms, t.n);
            if (d != null) out.put(k, d);
        });
        return out;
    }


    /** Rules checked against the zones a CSV names; any channel name is accepted (nothing is sent). */
    private static RuleContext csvContext(List<ZoneReading> rows, Map<String, java.time.Duration> maxAges) {
        Set<String> zones = new LinkedHashSet<>();
        for (ZoneReading r : rows) zones.add(r.zone());
        Set<String> anyChannel = new AbstractSet<>() {
            @Override
            public boolean contains(Object o) {
                return true;
            }

            @Override
            public Iterator<String> iterator() {
                return Collections.emptyIterator();
            }

            @Override
            public int size() {
                return 0;
            }
        };
        return new RuleContext() {
            @Override
            public Set<String> zones() {
                return zones;
            }

            @Override
            public Map<String, Set<String>> groups() {
                return Map.of();
            }

            @Override
            public Set<String> channels() {
                return anyChannel;
            }

            @Override
            public Set<Quantity> quantities(String zone) {
                return java.util.EnumSet.allOf(Quantity.class);
            }

            @Override
            public java.time.Duration maxAge(String zone) {
                return maxAges.getOrDefault(zone, RuleContext.DEFAULT_MAX_AGE);
            }
        };
    }
}
