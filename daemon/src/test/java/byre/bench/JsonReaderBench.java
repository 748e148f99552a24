package byre.bench;

import byre.config.PayloadFormat;
import byre.config.SensorConfig;
import byre.demo.LoadConfig;
import byre.ingest.Decoded;
import byre.ingest.PayloadDecoder;
import byre.testing.ByreProcess;
import byre.units.Quantity;
import byre.units.Unit;
import com.fasterxml.jackson.core.json.PackageVersion;
import java.lang.management.ManagementFactory;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;

/**
 * byre's payload decoding ({@link PayloadDecoder}, on Jackson's streaming parser through {@code byre.json.Json}) in
 * nanoseconds and bytes allocated per payload (a benchmark, not a test), as a regression measure against the figures
 * in the README's "JSON reader: own or library". Payloads: the ingest benchmark's ({@link LoadConfig#payload}), a flat
 * object with more members, a nested object read by dotted paths, a SenML pack and, as a control without JSON, a plain
 * number. Every payload is first checked to decode. Then, after a warm-up, rounds over the formats; medians of the
 * rounds, and the decoding's share of byre's time per message at each ingest rate given ({@code --rates}, messages/s,
 * e.g. the README's QoS 0 and QoS 1 figures). It runs itself twice as child JVMs: with the service's options from
 * {@code systemd/byre.service} (C1 only, as byre runs) and with the same options but the default JIT (C2).
 *
 * <p>Run from the repository root (needs the test class path; {@code run.sh} builds it):
 * {@code mvn -q -B -o -pl daemon -am test-compile dependency:build-classpath -Dmdep.outputFile=target/bench.classpath
 * -Dmdep.includeScope=test} then {@code java -cp "daemon/target/test-classes:daemon/target/classes:$(cat
 * daemon/target/bench.classpath)" byre.bench.JsonReaderBench --rounds 7 --rates 70197,35258}
 */
public final class JsonReaderBench {
    private static final Instant ARRIVAL = Instant.parse("2026-05-12T10:00:00Z");
    private static final long T0 = ARRIVAL.toEpochMilli();
    private static final int PER_FORMAT = 200;
    /** Time per measured stretch of one decoder on one format. */
    private static final long STRETCH_NS = 200_000_000L;
    private static long sink;

    private record Payload(SensorConfig sensor, byte[] bytes) {}

    private record Format(String name, List<Payload> payloads) {
        double meanBytes() {
            return payloads.stream().mapToInt(p -> p.bytes.length).average().orElse(0);
        }
    }

    public static void main(String[] args) throws Exception {
        int rounds = 7;
        double[] rates = {};
        String child = null;
        for (int i = 0; i < args.length; i++) {
            switch (args[i]) {
                case "--rounds": rounds = Integer.parseInt(args[++i]); break;
                case "--rates": rates = Arrays.stream(args[++i].split(",")).mapToDouble(Double::parseDouble).toArray(); break;
                case "--child": child = args[++i]; break;
                default: throw new IllegalArgumentException("unknown option " + args[i] + " (--rounds N, --rates R0,R1)");
            }
        }
        if (child != null) {
            run(child, rounds, rates);
            return;
        }
        List<String> service = ByreProcess.SERVICE_JVM_OPTIONS;
        List<String> defaultJit = new ArrayList<>(service);
        defaultJit.removeIf(o -> o.startsWith("-XX:TieredStopAtLevel"));
        fork(service, "service options (C1 only)", args);
        fork(defaultJit, "service options without -XX:TieredStopAtLevel=1 (default JIT, C2)", args);
    }

    private static void fork(List<String> jvmOptions, String label, String[] args) throws Exception {
        List<String> cmd = new ArrayList<>();
        cmd.add(Path.of(System.getProperty("java.home"), "bin", "java").toString());
        cmd.addAll(jvmOptions);
        cmd.add("-cp");
        cmd.add(System.getProperty("java.class.path"));
        cmd.add(JsonReaderBench.class.getName());
        cmd.addAll(List.of(args));
        cmd.add("--child");
        cmd.add(label + ": " + String.join(" ", jvmOptions));
        int exit = new ProcessBuilder(cmd).inheritIO().start().waitFor();
        if (exit != 0) throw new IllegalStateException("benchmark JVM exited with " + exit);
    }

    private static void run(String label, int rounds, double[] rates) {
        List<Format> formats = corpus();
        System.out.println();
        System.out.println("JVM: " + label);
        System.out.println("Jackson core " + PackageVersion.VERSION);
        for (Format f : formats) decodes(f);

        long[] counts = new long[formats.size()];
        for (int w = 0; w < 3; w++) { // warm-up: the JIT compiles the decoding; the last pass sizes the stretches
            for (int f = 0; f < formats.size(); f++) {
                double ns = measure(formats.get(f), 20_000)[0];
                counts[f] = Math.max(20_000, (long) (STRETCH_NS / ns));
            }
        }
        double[][] ns = new double[formats.size()][rounds];
        double[][] bytes = new double[formats.size()][rounds];
        for (int r = 0; r < rounds; r++) {
            for (int k = 0; k < formats.size(); k++) {
                int f = (k + r) % formats.size(); // each format first in turn
                double[] m = measure(formats.get(f), counts[f]);
                ns[f][r] = m[0];
                bytes[f][r] = m[1];
            }
        }

        System.out.printf(Locale.ROOT, "medians of %d rounds: ns per payload (min..max of the rounds), bytes allocated per payload%n", rounds);
        for (int f = 0; f < formats.size(); f++) {
            Format format = formats.get(f);
            double[] sorted = ns[f].clone();
            Arrays.sort(sorted);
            System.out.printf(Locale.ROOT, "  %-58s %6.0f ns (%.0f..%.0f) %6.0f B%n", format.name + String.format(Locale.ROOT, " (%.0f B)", format.meanBytes()),
                    median(ns[f]), sorted[0], sorted[rounds - 1], median(bytes[f]));
        }
        for (double rate : rates) {
            double budgetNs = 1e9 / rate;
            System.out.printf(Locale.ROOT, "decoding as a share of byre's time per message at %,.0f msgs/s (%,.0f ns):%n", rate, budgetNs);
            for (int f = 0; f < formats.size(); f++) {
                System.out.printf(Locale.ROOT, "  %-50s %5.2f %%%n", formats.get(f).name, 100 * median(ns[f]) / budgetNs);
            }
        }
        System.out.println("(checksum " + (sink != 0) + ")");
    }

    /** The payload corpus, {@link #PER_FORMAT} distinct payloads per format. */
    private static List<Format> corpus() {
        List<Format> formats = new ArrayList<>();
        List<Payload> ingest = new ArrayList<>();
        List<Payload> flat = new ArrayList<>();
        List<Payload> nested = new ArrayList<>();
        List<Payload> senml = new ArrayList<>();
        List<Payload> number = new ArrayList<>();
        SensorConfig vTs = json("v", "ts");
        SensorConfig deep = json("sensor.temp.v", "meta.ts");
        SensorConfig[] pack = {
            senml("larkmoor/calf-barn/pen3/temp", Quantity.DRY_BULB, Unit.C),
            senml("rh", Quantity.RH, Unit.PERCENT),
            senml("air", Quantity.AIR_SPEED, Unit.M_PER_S),
        };
        SensorConfig plain = new SensorConfig("pen3-dry", "larkmoor/calf-barn/pen3/dry", Quantity.DRY_BULB, Unit.C, PayloadFormat.NUMBER, null, 0, 1);
        for (int i = 0; i < PER_FORMAT; i++) {
            long n = 37L * i;
            long at = T0 + i;
            double temp = 18.0 + (i % 97) / 10.0;
            double rh = 55.0 + (i % 41) / 4.0;
            ingest.add(new Payload(vTs, bytes(LoadConfig.payload(i, n, at, 50))));
            flat.add(new Payload(vTs, bytes(String.format(Locale.ROOT,
                    "{\"id\":\"calf-pen-%02d\",\"v\":%.2f,\"bat\":%.2f,\"rssi\":%d,\"ts\":%d}", i % 12, temp, 2.9 + (i % 30) / 100.0, -50 - i % 40, at))));
            nested.add(new Payload(deep, bytes(String.format(Locale.ROOT,
                    "{\"device\":{\"id\":\"larkmoor-calf-%02d\",\"fw\":\"1.4.2\"},\"sensor\":{\"temp\":{\"v\":%.2f,\"u\":\"C\"},\"rh\":%.1f},"
                            + "\"meta\":{\"ts\":%d.%03d,\"rssi\":%d}}", i % 12, temp, rh, at / 1000, at % 1000, -50 - i % 40))));
            senml.add(new Payload(pack[i % pack.length], bytes(String.format(Locale.ROOT,
                    "[{\"bn\":\"larkmoor/calf-barn/pen3/\",\"bt\":%d,\"n\":\"temp\",\"u\":\"Cel\",\"v\":%.1f},"
                            + "{\"n\":\"rh\",\"u\":\"%%RH\",\"v\":%.1f},{\"n\":\"air\",\"u\":\"m/s\",\"v\":%.2f,\"t\":-1}]",
                    at / 1000, temp, rh, 0.2 + (i % 13) / 10.0))));
            number.add(new Payload(plain, bytes(String.format(Locale.ROOT, "%.2f", temp))));
        }
        formats.add(new Format("ingest bench {\"v\",\"ts\"} (json:v, time json:ts)", ingest));
        formats.add(new Format("flat, 5 members (json:v, time json:ts)", flat));
        formats.add(new Format("nested (json:sensor.temp.v, time json:meta.ts)", nested));
        formats.add(new Format("SenML pack of 3 records (senml:<name>)", senml));
        formats.add(new Format("plain number (control: no JSON)", number));
        return formats;
    }

    private static SensorConfig json(String path, String timePath) {
        return new SensorConfig("pen3-air", "larkmoor/calf-barn/pen3/air", Quantity.DRY_BULB, Unit.C,
                new PayloadFormat(PayloadFormat.Kind.JSON, path), timePath, 0, 1);
    }

    private static SensorConfig senml(String name, Quantity quantity, Unit unit) {
        return new SensorConfig("pen3-" + quantity.name().toLowerCase(Locale.ROOT), "larkmoor/calf-barn/pen3/senml", quantity, unit,
                new PayloadFormat(PayloadFormat.Kind.SENML, name), null, 0, 1);
    }

    private static byte[] bytes(String s) {
        return s.getBytes(StandardCharsets.UTF_8);
    }

    /** Every payload of the corpus decodes (a benchmark of rejections would measure something else). */
    private static void decodes(Format format) {
        for (Payload p : format.payloads) {
            Decoded d = PayloadDecoder.decode(p.sensor, p.bytes, ARRIVAL);
            if (!d.ok()) throw new IllegalStateException(format.name + ": rejects " + new String(p.bytes, StandardCharsets.UTF_8) + ": " + d.detail());
        }
    }

    /** Decodes {@code count} payloads of the format in turn: ns per payload and bytes allocated per payload. */
    private static double[] measure(Format format, long count) {
        com.sun.management.ThreadMXBean threads = (com.sun.management.ThreadMXBean) ManagementFactory.getThreadMXBean();
        List<Payload> payloads = format.payloads;
        int size = payloads.size();
        long acc = 0;
        long allocatedBefore = threads.getCurrentThreadAllocatedBytes();
        long start = System.nanoTime();
        for (long i = 0; i < count; i++) {
            Payload p = payloads.get((int) (i % size));
            Decoded d = PayloadDecoder.decode(p.sensor, p.bytes, ARRIVAL);
            acc += Double.doubleToRawLongBits(d.value()) + (d.payloadTime() == null ? 0 : 1);
        }
        long ns = System.nanoTime() - start;
        long allocated = threads.getCurrentThreadAllocatedBytes() - allocatedBefore;
        sink += acc;
        return new double[] {(double) ns / count, (double) allocated / count};
    }

    private static double median(double[] values) {
        double[] v = values.clone();
        Arrays.sort(v);
        return v[v.length / 2];
    }
}
