package byre.bench;

import byre.config.PayloadFormat;
import byre.config.SensorConfig;
import byre.demo.LoadConfig;
import byre.ingest.Decoded;
import byre.ingest.JacksonPayloadDecoder;
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
import java.util.Objects;

/**
 * byre's payload decoding ({@link PayloadDecoder} on byre's own JSON reader) against the same job done with Jackson's
 * streaming parser ({@link JacksonPayloadDecoder}, with Jackson's default and its fast exact double reader), in
 * nanoseconds per payload (a benchmark, not a test). Payloads: the ingest benchmark's ({@link LoadConfig#payload}),
 * a flat object with more members, a nested object read by dotted paths, a SenML pack and, as a control where both
 * sides run the same code, a plain number. Every payload is first checked to decode to the same value, unit and time
 * both ways; a list of bad and odd inputs shows where the two readers disagree. Then, after a warm-up, rounds that
 * alternate the order of the three decoders; medians of the rounds.
 *
 * <p>The decision it serves: byre keeps its own JSON reader only if the library's extra time per payload is more than
 * 3 % of the time byre has per message at its ingest rate ({@code --rates}, messages/s, e.g. the README's QoS 0 and
 * QoS 1 figures). It runs itself twice as child JVMs: with the service's options from {@code systemd/byre.service}
 * (C1 only, as byre runs) and with the same options but the default JIT (C2), for reference.
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

    @FunctionalInterface
    private interface Decoder {
        Decoded decode(SensorConfig sensor, byte[] payload, Instant arrival);
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
        JacksonPayloadDecoder plain = new JacksonPayloadDecoder(false);
        JacksonPayloadDecoder fast = new JacksonPayloadDecoder(true);
        Decoder[] decoders = {PayloadDecoder::decode, plain::decode, fast::decode};
        String[] names = {"byre", "Jackson", "Jackson fast doubles"};

        System.out.println();
        System.out.println("JVM: " + label);
        System.out.println("Jackson core " + PackageVersion.VERSION + " (nesting limit "
                + plain.factory().streamReadConstraints().getMaxNestingDepth() + "; byre's reader 32)");
        for (Format f : formats) sameResults(f, decoders, names);
        differences(plain);

        long[] counts = new long[formats.size()];
        for (int w = 0; w < 3; w++) { // warm-up: the JIT compiles all three paths; the last pass sizes the stretches
            for (int f = 0; f < formats.size(); f++) {
                for (int d = 0; d < decoders.length; d++) {
                    double ns = measure(formats.get(f), decoders[d], 20_000)[0];
                    if (d == 0) counts[f] = Math.max(20_000, (long) (STRETCH_NS / ns));
                }
            }
        }
        double[][][] ns = new double[formats.size()][decoders.length][rounds];
        double[][][] bytes = new double[formats.size()][decoders.length][rounds];
        for (int r = 0; r < rounds; r++) {
            for (int f = 0; f < formats.size(); f++) {
                for (int k = 0; k < decoders.length; k++) {
                    int d = (k + r) % decoders.length; // each decoder goes first, second and third in turn
                    double[] m = measure(formats.get(f), decoders[d], counts[f]);
                    ns[f][d][r] = m[0];
                    bytes[f][d][r] = m[1];
                }
            }
        }

        System.out.printf(Locale.ROOT, "medians of %d rounds, ns per payload (ratio to byre: median of per-round ratios; B = bytes allocated per payload)%n", rounds);
        System.out.printf(Locale.ROOT, "%-58s %7s %8s %6s %8s %6s  %s%n", "payload (mean size)", "byre", "Jackson", "ratio",
                "J. fast", "ratio", "B byre / J. / J. fast");
        double[][] extra = new double[formats.size()][2];
        for (int f = 0; f < formats.size(); f++) {
            Format format = formats.get(f);
            double own = median(ns[f][0]);
            double[] ratio = new double[2];
            for (int j = 1; j <= 2; j++) {
                double[] perRound = new double[rounds];
                double[] diff = new double[rounds];
                for (int r = 0; r < rounds; r++) {
                    perRound[r] = ns[f][j][r] / ns[f][0][r];
                    diff[r] = ns[f][j][r] - ns[f][0][r];
                }
                ratio[j - 1] = median(perRound);
                extra[f][j - 1] = median(diff);
            }
            System.out.printf(Locale.ROOT, "%-58s %7.0f %8.0f %6.2f %8.0f %6.2f  %.0f / %.0f / %.0f%n",
                    format.name + String.format(Locale.ROOT, " (%.0f B)", format.meanBytes()), own, median(ns[f][1]), ratio[0],
                    median(ns[f][2]), ratio[1], median(bytes[f][0]), median(bytes[f][1]), median(bytes[f][2]));
        }
        for (double rate : rates) {
            double budgetNs = 1e9 / rate;
            System.out.printf(Locale.ROOT, "Jackson's extra time (median per-round difference) as a share of byre's time per message at %,.0f msgs/s (%,.0f ns):%n",
                    rate, budgetNs);
            for (int f = 0; f < formats.size(); f++) {
                System.out.printf(Locale.ROOT, "  %-50s %+5.0f ns = %+5.2f %%   fast doubles %+5.0f ns = %+5.2f %%%n", formats.get(f).name,
                        extra[f][0], 100 * extra[f][0] / budgetNs, extra[f][1], 100 * extra[f][1] / budgetNs);
            }
        }
        if (rates.length > 0) {
            double highest = Arrays.stream(rates).max().getAsDouble();
            double share = 100 * Math.min(extra[0][0], extra[0][1]) * highest / 1e9;
            System.out.printf(Locale.ROOT, "rule (ingest payload, cheaper Jackson setting, %,.0f msgs/s): Jackson costs %.2f %% -> %s%n", highest, share,
                    share > 3 ? "more than 3 %: keep byre's own reader" : "3 % or less: a library would do (the lead decides)");
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
        formats.add(new Format("plain number (control: same code both ways)", number));
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

    /** Every decoder gives the same value (bit for bit), unit, time and verdict; else the timings would compare different work. */
    private static void sameResults(Format format, Decoder[] decoders, String[] names) {
        for (Payload p : format.payloads) {
            Decoded own = decoders[0].decode(p.sensor, p.bytes, ARRIVAL);
            if (!own.ok()) throw new IllegalStateException(format.name + ": byre rejects " + text(p.bytes) + ": " + own.detail());
            for (int d = 1; d < decoders.length; d++) {
                Decoded other = decoders[d].decode(p.sensor, p.bytes, ARRIVAL);
                if (!same(own, other)) throw new IllegalStateException(format.name + ": " + names[d] + " gives " + other + " for " + text(p.bytes) + ", byre " + own);
            }
        }
    }

    private static boolean same(Decoded a, Decoded b) {
        return a.reject() == b.reject() && Double.doubleToRawLongBits(a.value()) == Double.doubleToRawLongBits(b.value())
                && a.unit() == b.unit() && Objects.equals(a.payloadTime(), b.payloadTime());
    }

    /** Bad and odd payloads: prints those the two readers treat differently (not part of the timing). */
    private static void differences(JacksonPayloadDecoder jackson) {
        SensorConfig vTs = json("v", "ts");
        SensorConfig deep = json("a.b", null);
        SensorConfig pack = senml("rh", Quantity.RH, Unit.PERCENT);
        String deepSkipped = "{\"x\":" + "[".repeat(40) + "]".repeat(40) + ",\"v\":1}";
        String longNumber = "{\"v\":1" + "0".repeat(1100) + "}";
        Object[][] cases = {
            {vTs, "{\"v\":21.4,}"}, {vTs, "{\"v\":21.4} x"}, {vTs, "{\"v\":21.4}{\"v\":1}"}, {vTs, "{\"v\":01}"},
            {vTs, "{\"v\":NaN}"}, {vTs, "{'v':1}"}, {vTs, "{\"v\":1 /* c */}"}, {vTs, "{\"v\":1e400}"},
            {vTs, "{\"v\":\"21.4\"}"}, {vTs, "{\"v\":1,\"v\":2}"}, {vTs, "{\"v\":-0}"}, {vTs, "{\"v\":-0.0}"},
            {vTs, "{\"v\":1,\"ts\":\"soon\"}"}, {vTs, "{\"v\":1,\"ts\":[1]}"}, {vTs, "{\"v\":{\"x\":1}}"}, {vTs, "{\"v\":[1,2}"},
            {vTs, "{\"id\":\"a\u0001b\",\"v\":1}"}, {vTs, "{\"id\":\"a\\xb\",\"v\":1}"}, {vTs, "{\"id\":\"\\ud800\",\"v\":1}"},
            {vTs, "\f{\"v\":1}"}, {vTs, "\uFEFF{\"v\":1}"}, {vTs, ""}, {vTs, "  "}, {vTs, "[1]"}, {vTs, "{\"v\":1"},
            {vTs, deepSkipped}, {vTs, longNumber}, {deep, "{\"a\":{\"b\":1},\"a\":{\"c\":2}}"}, {deep, "{\"a\":[{\"b\":1}]}"},
            {pack, "[{\"n\":\"rh\",\"v\":50},{\"n\":\"x\",\"v\":1},]"}, {pack, "[{\"n\":\"rh\",\"v\":50}] 1"}, {pack, "{\"n\":\"rh\"}"},
            {pack, "[1,{\"n\":\"rh\",\"v\":50}]"}, {pack, "[{\"n\":\"rh\",\"v\":\"50\"}]"}, {pack, "[{\"n\":\"rh\",\"u\":\"Cel\",\"v\":50}]"},
        };
        List<String> differ = new ArrayList<>();
        List<byte[]> payloads = new ArrayList<>();
        for (Object[] c : cases) payloads.add(bytes((String) c[1]));
        payloads.add(new byte[] {'{', '"', 'i', 'd', '"', ':', '"', (byte) 0xC3, '(', '"', ',', '"', 'v', '"', ':', '1', '}'});
        for (int i = 0; i < payloads.size(); i++) {
            SensorConfig sensor = i < cases.length ? (SensorConfig) cases[i][0] : vTs;
            Decoded own = PayloadDecoder.decode(sensor, payloads.get(i), ARRIVAL);
            Decoded other = jackson.decode(sensor, payloads.get(i), ARRIVAL);
            if (!same(own, other)) {
                differ.add(String.format(Locale.ROOT, "  %s %s: byre %s, Jackson %s", sensor.payload(), text(payloads.get(i)), verdict(own), verdict(other)));
            }
        }
        System.out.printf(Locale.ROOT, "%d bad or odd payloads: %d decoded alike%s%n", payloads.size(), payloads.size() - differ.size(),
                differ.isEmpty() ? "" : ", these differently:");
        differ.forEach(System.out::println);
    }

    private static String verdict(Decoded d) {
        return d.ok() ? "value " + d.value() : d.reject() + " (" + d.detail() + ")";
    }

    private static String text(byte[] b) {
        String s = new String(b, StandardCharsets.UTF_8);
        StringBuilder out = new StringBuilder();
        for (char c : (s.length() > 60 ? s.substring(0, 60) + "..." : s).toCharArray()) {
            out.append(c < 0x20 || c > 0x7e ? String.format(Locale.ROOT, "\\u%04x", (int) c) : String.valueOf(c));
        }
        return "'" + out + "'";
    }

    /** Decodes {@code count} payloads of the format in turn: ns per payload and bytes allocated per payload. */
    private static double[] measure(Format format, Decoder decoder, long count) {
        com.sun.management.ThreadMXBean threads = (com.sun.management.ThreadMXBean) ManagementFactory.getThreadMXBean();
        List<Payload> payloads = format.payloads;
        int size = payloads.size();
        long acc = 0;
        long allocatedBefore = threads.getCurrentThreadAllocatedBytes();
        long start = System.nanoTime();
        for (long i = 0; i < count; i++) {
            Payload p = payloads.get((int) (i % size));
            Decoded d = decoder.decode(p.sensor, p.bytes, ARRIVAL);
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
