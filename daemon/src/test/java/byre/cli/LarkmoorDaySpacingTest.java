package byre.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.config.ByreConfig;
import byre.config.SensorConfig;
import byre.demo.DemoConfig;
import byre.demo.FeedMessage;
import byre.demo.LarkmoorFarm;
import byre.ingest.Decoded;
import byre.ingest.PayloadDecoder;
import byre.testing.Configs;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Random;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The simulated Larkmoor day through {@code byre replay} with the demo configuration and the example rules,
 * once with every sensor reporting each minute and once each 5 minutes, with ±10 s of jitter: the same
 * watches raise in the same zones. No max-age is configured: it follows the sensors.
 */
class LarkmoorDaySpacingTest {
    @TempDir
    Path dir;

    static final Pattern RAISED = Pattern.compile("\"event\":\"raised\".*\"watch\":\"([^\"]+)\".*\"zone\":\"([^\"]+)\"");

    Path config() throws Exception {
        Path rules = Path.of("..", "rules", "examples").toAbsolutePath().normalize();
        return Files.writeString(dir.resolve("byre.yaml"), DemoConfig.yaml(1883, 9466, rules, dir.resolve("history.db")));
    }

    /** The day's readings as a {@code time,sensor,value} CSV, values in each sensor's configured unit. */
    Path day(ByreConfig cfg, Duration every, long jitterSeed, boolean jittered) throws Exception {
        Random jitter = new Random(jitterSeed);
        List<Object[]> rows = new ArrayList<>();
        for (FeedMessage m : new LarkmoorFarm(7, LarkmoorFarm.DEFAULT_START, every).run(Duration.ofHours(24))) {
            SensorConfig s = cfg.sensors().values().stream().filter(x -> x.topic().equals(m.topic())).findFirst().orElseThrow();
            Decoded d = PayloadDecoder.decode(s, m.payload(), m.simTime());
            assertTrue(d.ok(), m + ": " + d.detail());
            double value = s.unit().fromCanonical(d.unit().toCanonical(d.value()));
            // Each zone's sensors as one module: all its values at the start of the interval (the simulator staggers
            // them, which would hide a stale zone behind its neighbours' readings), each ±10 s late or early.
            long step = every.toMillis();
            long sinceStart = Duration.between(LarkmoorFarm.DEFAULT_START, m.simTime()).toMillis();
            Instant at = LarkmoorFarm.DEFAULT_START.plusMillis(sinceStart / step * step + (jittered ? jitter.nextInt(20_001) - 10_000 : 0));
            rows.add(new Object[] {at, s.id(), value});
        }
        rows.sort((a, b) -> ((Instant) a[0]).compareTo((Instant) b[0]));
        StringBuilder sb = new StringBuilder("time,sensor,value\n");
        for (Object[] r : rows) sb.append(r[0]).append(',').append(r[1]).append(',').append(String.format(Locale.ROOT, "%.3f", (double) r[2])).append('\n');
        return Files.writeString(dir.resolve("day-" + every.toMinutes() + "m.csv"), sb.toString());
    }

    /** Watch/zone to the time it first raised. */
    java.util.Map<String, Instant> raised(Path cfg, Path csv) {
        CliRun r = CliRun.of("replay", "--config", cfg.toString(), "--rules", Path.of("..", "rules", "examples").toString(),
                "--readings", csv.toString(), "--json");
        assertEquals(Main.OK, r.code(), r.err());
        java.util.Map<String, Instant> out = new java.util.TreeMap<>();
        for (String line : r.out().lines().toList()) {
            Matcher m = RAISED.matcher(line);
            if (m.find()) out.putIfAbsent(m.group(1) + "/" + m.group(2), ReportingSpacingTest.field(line, "at"));
        }
        return out;
    }

    @Test
    void everyMinuteAndEveryFiveMinutesRaiseTheSameWatches() throws Exception {
        Path cfgFile = config();
        ByreConfig cfg = Configs.load(cfgFile);
        java.util.Map<String, Instant> everyMinute = raised(cfgFile, day(cfg, Duration.ofMinutes(1), 3, false));
        // What the day is built to show (LarkmoorScenario): heat in the cow shed, a dry wick in pen 1, pen 2's silent
        // anemometer, and a cold windy night in both pens.
        for (String w : List.of("heat-alert/cow-shed", "dry-wick/calf-pen-1", "quiet-anemometer/calf-pen-2",
                "calf-draught/calf-pen-1", "calf-draught/calf-pen-2", "young-calf-cold/calf-pen-1")) {
            assertTrue(everyMinute.containsKey(w), w + " in " + everyMinute);
        }
        java.util.Map<String, Instant> everyFive = raised(cfgFile, day(cfg, Duration.ofMinutes(5), 11, false));
        java.util.Map<String, Instant> jittered = raised(cfgFile, day(cfg, Duration.ofMinutes(5), 11, true));
        assertEquals(everyMinute.keySet(), everyFive.keySet(), "every 5 minutes on the dot");
        assertEquals(everyMinute.keySet(), jittered.keySet(), "every 5 minutes, ±10 s");
        // (The times differ by up to about 11 minutes on this noisy day: a 2-hour minimum of 24 samples is not one
        // of 120, and a silence waits for the longer max-age. ReportingSpacingTest bounds the times on clean ramps.)
    }
}
