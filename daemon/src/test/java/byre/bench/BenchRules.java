package byre.bench;

import byre.demo.LoadConfig;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;

/**
 * The rules and configuration edits the benchmarks share: one heat watch per zone on the 2-minute mean of the derived
 * THI, with hold times and hysteresis, all notifying the webhook channel {@code hook}. The load generator's zones have
 * two dry-bulb sensors out of phase, so the zone THI jumps by about 1.5 from one derivation to the next; its 2-minute
 * mean drifts slowly across 68.3..68.8, so the watches do raise and clear. For the alert latency: a probe sensor in a
 * zone of its own, watched without a hold time.
 */
final class BenchRules {
    static final String PROBE_SENSOR = "s0201";
    static final String PROBE_ZONE = "z51";
    static final String PROBE_TOPIC = "probe/" + PROBE_ZONE + "/" + PROBE_SENSOR;
    /**
     * Messages per 10 minutes on the probe channel: far above what a barn needs (and the default), so that the latency
     * bench's cycles (two messages each) are not held back by the limit; a bench setting, not a product default.
     */
    static final int PROBE_RATE_LIMIT = 100_000;

    private BenchRules() {}

    /** Writes one watch for each of {@code zones} zones (one file, none for 0) into {@code dir}; with {@code probe}, also the probe watch. */
    static void write(Path dir, int zones, boolean probe) throws IOException {
        Files.createDirectories(dir);
        StringBuilder sb = new StringBuilder("# Benchmark watches: heat by the mean THI in every load zone.\n");
        for (int z = 0; z < zones; z++) {
            String id = LoadConfig.zoneId(z, zones);
            sb.append("watch heat-").append(id).append('\n')
                    .append("  raise when avg(").append(id).append(".thi, 2m) > 68.8 for 1m\n")
                    .append("  clear when avg(").append(id).append(".thi, 2m) < 68.3 for 1m\n")
                    .append("  level warning\n  notify hook\n")
                    .append("  message \"THI {value} in {zone}\"\n\n");
        }
        if (zones > 0) Files.writeString(dir.resolve("heat.rules"), sb.toString());
        if (probe) {
            Files.writeString(dir.resolve("probe.rules"), "# Alert latency probe: no hold time.\nwatch hot-" + PROBE_ZONE + "\n"
                    + "  raise when " + PROBE_ZONE + ".dry-bulb > 40 C\n"
                    + "  clear when " + PROBE_ZONE + ".dry-bulb < 38 C\n"
                    + "  level critical\n  notify probe\n");
        }
    }

    /**
     * Edits a {@link LoadConfig#yaml} configuration: webhook channels {@code hook} (and {@code probe}) to the sink
     * instead of the command channel; with {@code probe}, the probe sensor and its zone.
     */
    static String config(String loadYaml, HookSink sink, boolean probe) {
        String notify = "notify:\n  hook: { type: webhook, url: \"" + sink.url("/hook") + "\", rate-limit: 1000 }\n"
                + (probe ? "  probe: { type: webhook, url: \"" + sink.url("/probe") + "\", rate-limit: " + PROBE_RATE_LIMIT + " }\n" : "");
        String y = loadYaml.replaceFirst("notify:\n  bench-sink: \\{[^\n]*\\}\n", java.util.regex.Matcher.quoteReplacement(notify));
        if (!y.contains(sink.url("/hook"))) throw new IllegalStateException("LoadConfig's notify section changed; update BenchRules");
        if (probe) {
            y = y.replace("\nzones:\n", "  " + PROBE_SENSOR + ": { topic: " + PROBE_TOPIC
                    + ", quantity: dry-bulb, unit: C, payload: \"json:v\", time: \"json:ts\" }\n\nzones:\n  " + PROBE_ZONE
                    + ":\n    sensors: [" + PROBE_SENSOR + "]\n    elevation: 0 m\n    max-age: 5m\n");
        }
        return y;
    }
}
