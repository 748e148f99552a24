package byre.bench;

import byre.cli.Main;
import byre.config.ByreConfig;
import byre.daemon.ConfigRuleContext;
import byre.daemon.Replay;
import byre.daemon.RuleFiles;
import byre.demo.LoadConfig;
import byre.ingest.Reading;
import byre.rules.CompileResult;
import byre.rules.RuleCompiler;
import byre.rules.RuleSet;
import byre.rules.ZoneReading;
import byre.rules.eval.WatchEngine;
import byre.testing.Configs;
import byre.units.Quantity;
import byre.zones.ClimateDeriver;
import java.io.BufferedReader;
import java.io.BufferedWriter;
import java.io.ByteArrayOutputStream;
import java.io.OutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Instant;
import java.time.ZoneOffset;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

/**
 * Replay throughput, in process (a main, not a test), with the benchmark's 50 THI watches ({@link BenchRules}):
 * (a) zone THI readings through {@link Replay} (engine, incident book, one-second ticks) against the same readings
 * through {@link WatchEngine} alone (accept, plus a tick per second); (b) raw sensor readings (dry-bulb, RH,
 * air speed) through {@link Replay}, i.e. zone derivation too, against the same baseline per reading; (c) the
 * {@code byre replay} verb over a generated zone CSV, against reading and splitting that file with
 * {@link BufferedReader} and parsing its times and numbers. Each measurement is the best of a few repetitions
 * after a warm-up.
 */
public final class ReplayBench {
    static final int SENSORS = 200;
    static final int ZONES = 50;
    static final Instant T0 = Instant.parse("2026-07-14T00:00:00Z");

    public static void main(String[] args) throws Exception {
        List<String[]> table = new ArrayList<>();
        rows(table, args.length > 0 ? Integer.parseInt(args[0]) : 1_000_000);
        IngestBench.print(table);
    }

    static void rows(List<String[]> table, int csvLines) throws Exception {
        Path work = Files.createTempDirectory("byre-replay");
        try {
            Path rules = work.resolve("rules.d");
            BenchRules.write(rules, ZONES, false);
            Path cfgFile = work.resolve("byre.yaml");
            Files.writeString(cfgFile, LoadConfig.yaml(SENSORS, ZONES, "tcp://127.0.0.1:1883", null, "load", rules, work.resolve("h.db"))
                    .replace("bench-sink", "hook"));
            ByreConfig config = Configs.load(cfgFile);
            CompileResult compiled = RuleCompiler.compile(RuleFiles.read(List.of(rules)), new ConfigRuleContext(config));
            if (compiled.hasErrors() || !compiled.warnings().isEmpty()) throw new IllegalStateException(compiled.render());
            RuleSet ruleSet = compiled.ruleSet().orElseThrow();

            List<ZoneReading> zoneRows = zoneReadings(400_000);
            long[] events = new long[1];
            Job engineJob = () -> {
                WatchEngine e = new WatchEngine(ruleSet, ZoneOffset.UTC, WatchEngine.Options.replay());
                Instant last = null;
                long n = 0;
                for (ZoneReading r : zoneRows) {
                    if (!r.at().equals(last)) {
                        n += e.tick(r.at()).size();
                        last = r.at();
                    }
                    n += e.accept(r).size();
                }
                return n;
            };
            Job replayJob = () -> {
                Replay rp = new Replay(ruleSet, ZoneOffset.UTC, "loadtest", new ArrayList<>(config.zones().values()), new ClimateDeriver());
                long n = 0;
                for (ZoneReading r : zoneRows) n += rp.zoneReading(r).size();
                events[0] = n;
                return n;
            };
            // interleaved, so that neither gets the other's JIT state or a quieter moment of the machine
            double[] rates = bestInterleaved(zoneRows.size(), engineJob, replayJob);
            double engine = rates[0], replay = rates[1];
            table.add(IngestBench.row("replay, zone THI readings/s through Replay, 50 watches (" + events[0] + " events in "
                            + zoneRows.size() / ZONES / 3600 + " h)", fmt(replay), fmt(engine) + " (WatchEngine alone)",
                    String.format(Locale.ROOT, "%.2f", replay / engine)));

            List<Reading> sensorRows = sensorReadings(400_000);
            double sensors = best(() -> {
                Replay rp = new Replay(ruleSet, ZoneOffset.UTC, "loadtest", new ArrayList<>(config.zones().values()), new ClimateDeriver());
                long n = 0;
                for (Reading r : sensorRows) n += rp.sensorReading(r).size();
                events[0] = n;
                return n;
            }, sensorRows.size());
            table.add(IngestBench.row("replay, raw sensor readings/s through Replay (derivation + 50 watches; " + events[0] + " events)",
                    fmt(sensors), fmt(engine) + " (WatchEngine alone, zone readings)",
                    String.format(Locale.ROOT, "%.2f", sensors / engine)));

            Path csv = work.resolve("readings.csv");
            writeCsv(csv, csvLines);
            double parse = best(() -> parseOnly(csv), csvLines);
            PrintStream saved = System.out;
            ByteArrayOutputStream captured = new ByteArrayOutputStream();
            double verb;
            int[] code = new int[1];
            try {
                System.setOut(new PrintStream(OutputStream.nullOutputStream(), false, StandardCharsets.UTF_8));
                verb = best(() -> {
                    code[0] = Main.execute("replay", "--rules", rules.toString(), "--readings", csv.toString());
                    return code[0];
                }, csvLines, 2);
            } finally {
                System.setOut(saved);
            }
            if (code[0] != 0) throw new IllegalStateException("byre replay exited with " + code[0] + captured);
            table.add(IngestBench.row(String.format(Locale.ROOT, "replay, CSV lines/s through `byre replay` (%,d lines, %.0f MB)",
                            csvLines, Files.size(csv) / 1e6), fmt(verb), fmt(parse) + " (read, split, parse time and value)",
                    String.format(Locale.ROOT, "%.2f; %.1f s", verb / parse, csvLines / verb)));
        } finally {
            try (var walk = Files.walk(work)) {
                walk.sorted(java.util.Comparator.reverseOrder()).forEach(f -> f.toFile().delete());
            }
        }
    }

    interface Job {
        long run() throws Exception;
    }

    static long sink;

    static double best(Job job, int items) throws Exception {
        return best(job, items, 4);
    }

    /** Items per second of the fastest of five alternating runs of each job, after one warm-up run of each. */
    static double[] bestInterleaved(int items, Job... jobs) throws Exception {
        double[] bestS = new double[jobs.length];
        java.util.Arrays.fill(bestS, Double.MAX_VALUE);
        for (Job j : jobs) sink += j.run();
        for (int rep = 0; rep < 5; rep++) {
            for (int i = 0; i < jobs.length; i++) {
                long t = System.nanoTime();
                sink += jobs[i].run();
                bestS[i] = Math.min(bestS[i], (System.nanoTime() - t) / 1e9);
            }
        }
        double[] rates = new double[jobs.length];
        for (int i = 0; i < jobs.length; i++) rates[i] = items / bestS[i];
        return rates;
    }

    /** Items per second of the fastest of {@code reps} runs after one warm-up run. */
    static double best(Job job, int items, int reps) throws Exception {
        sink += job.run();
        double bestS = Double.MAX_VALUE;
        for (int i = 0; i < reps; i++) {
            long t = System.nanoTime();
            sink += job.run();
            bestS = Math.min(bestS, (System.nanoTime() - t) / 1e9);
        }
        return items / bestS;
    }

    /** THI per zone once a second, wobbling across the watches' thresholds (2-minute mean 68.5 +- 1.2) with a period of about 5 minutes. */
    static double thi(int zone, long second) {
        return 68.5 + 1.5 * Math.sin((second + zone * 7L) / 50.0);
    }

    static List<ZoneReading> zoneReadings(int n) {
        List<ZoneReading> out = new ArrayList<>(n);
        for (int i = 0; i < n; i++) {
            long s = i / ZONES;
            int z = i % ZONES;
            out.add(new ZoneReading(T0.plusSeconds(s), LoadConfig.zoneId(z, ZONES), Quantity.THI, thi(z, s)));
        }
        return out;
    }

    /** The load generator's sensors once a second each, in its order and with its values. */
    static List<Reading> sensorReadings(int n) {
        List<Reading> out = new ArrayList<>(n);
        Quantity[] qs = {Quantity.DRY_BULB, Quantity.RH, Quantity.AIR_SPEED};
        for (int i = 0; i < n; i++) {
            long s = i / SENSORS;
            int sensor = i % SENSORS;
            String p = LoadConfig.payload(sensor, s, 0, ZONES);
            double v = Double.parseDouble(p.substring(p.indexOf(':') + 1, p.indexOf(',')));
            out.add(new Reading(LoadConfig.sensorId(sensor, SENSORS), qs[(sensor / ZONES) % 3], v,
                    T0.plusMillis(s * 1000 + sensor)));
        }
        return out;
    }

    static void writeCsv(Path csv, int lines) throws Exception {
        try (BufferedWriter w = Files.newBufferedWriter(csv, StandardCharsets.UTF_8)) {
            w.write("time,zone,quantity,value,unit\n");
            StringBuilder sb = new StringBuilder();
            for (int i = 0; i < lines; i++) {
                long s = i / ZONES;
                int z = i % ZONES;
                sb.setLength(0);
                sb.append(T0.plusSeconds(s)).append(',').append(LoadConfig.zoneId(z, ZONES)).append(",thi,")
                        .append(String.format(Locale.ROOT, "%.2f", thi(z, s))).append(",\n");
                w.append(sb);
            }
        }
    }

    static long parseOnly(Path csv) throws Exception {
        long n = 0;
        try (BufferedReader in = Files.newBufferedReader(csv, StandardCharsets.UTF_8)) {
            in.readLine();
            String line;
            while ((line = in.readLine()) != null) {
                String[] f = line.split(",", -1);
                n += Instant.parse(f[0]).getEpochSecond() + (long) Double.parseDouble(f[3]) + f[1].length() + f[2].length();
            }
        }
        return n;
    }

    static String fmt(double perSecond) {
        return String.format(Locale.ROOT, "%,.0f", perSecond);
    }
}
