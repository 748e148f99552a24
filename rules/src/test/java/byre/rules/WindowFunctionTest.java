package byre.rules;

import static org.junit.jupiter.api.Assertions.assertEquals;

import byre.rules.eval.AlertState;
import byre.rules.eval.WatchEngine;
import byre.units.Quantity;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneId;
import java.util.ArrayList;
import java.util.List;
import java.util.Random;
import org.junit.jupiter.api.Test;

/**
 * The incremental windows against a plain rescan of every reading (written independently here):
 * each watch below raises exactly when its window statistic crosses the threshold, so the engine's
 * state after every reading must equal the rescan's verdict.
 */
class WindowFunctionTest {
    record R(long t, double v) {}

    static final long W = 30 * 60_000L;

    static double rescan(String fn, List<R> rs, long now, double thr, long maxAge) {
        List<R> in = rs.stream().filter(r -> r.t > now - W && r.t <= now).toList();
        switch (fn) {
            case "avg": return in.isEmpty() ? Double.NaN : in.stream().mapToDouble(R::v).average().orElseThrow();
            case "min": return in.stream().mapToDouble(R::v).min().orElse(Double.NaN);
            case "max": return in.stream().mapToDouble(R::v).max().orElse(Double.NaN);
            case "rise": {
                R base = null;
                for (R r : rs) if (r.t <= now - W) base = r;
                return base == null ? Double.NaN : rs.get(rs.size() - 1).v - base.v;
            }
            default: { // hours above: each reading holds until the next, at most maxAge; clipped to the window
                double ms = 0;
                for (int i = 0; i < rs.size(); i++) {
                    R r = rs.get(i);
                    if (r.v <= thr) continue;
                    long end = Math.min(i + 1 < rs.size() ? rs.get(i + 1).t : now, r.t + maxAge);
                    long s = Math.max(r.t, now - W);
                    long e = Math.min(end, now);
                    if (e > s) ms += e - s;
                }
                return ms / 3_600_000.0;
            }
        }
    }

    @Test
    void incrementalWindowsAgreeWithARescan() {
        String[][] cases = {
                {"avg", "avg(cows.dry-bulb, 30m) > 20.5"},
                {"min", "min(cows.dry-bulb, 30m) > 19.8"},
                {"max", "max(cows.dry-bulb, 30m) > 21.9"},
                {"rise", "rise(cows.dry-bulb, 30m) > 0.7"},
                {"above", "hours-above(cows.dry-bulb, 20 C, 30m) > 0.2"},
        };
        double[] thresholds = {20.5, 19.8, 21.9, 0.7, 0.2};
        long maxAge = 5 * 60_000L;
        for (int c = 0; c < cases.length; c++) {
            String src = "watch w\n notify office\n raise when " + cases[c][1] + "\n clear when not (" + cases[c][1] + ")\n";
            CompileResult cr = RuleCompiler.compile(List.of(new RuleSource("w.rules", src)),
                    Scenario.farm().defaultMaxAge(Duration.ofMillis(maxAge)));
            WatchEngine e = new WatchEngine(cr.ruleSet().orElseThrow(), ZoneId.of("UTC"));
            Random rnd = new Random(7 + c);
            List<R> rs = new ArrayList<>();
            long t = Instant.parse("2026-01-15T00:00:00Z").toEpochMilli();
            double v = 20;
            int raisedChecks = 0;
            for (int i = 0; i < 3000; i++) {
                t += 1_000L * (5 + rnd.nextInt(rnd.nextInt(20) == 0 ? 900 : 90)); // irregular, with some gaps
                v = Math.round((v + rnd.nextGaussian() * 0.3) * 10) / 10.0;       // repeats happen, as in real data
                rs.add(new R(t, v));
                e.accept(new ZoneReading(Instant.ofEpochMilli(t), "cows", Quantity.DRY_BULB, v));
                double x = rescan(cases[c][0], rs, t, 20, maxAge);
                boolean expected = !Double.isNaN(x) && x > thresholds[c];
                boolean raised = e.state("w", "cows") == AlertState.RAISED;
                if (!Double.isNaN(x)) assertEquals(expected, raised, cases[c][0] + " at reading " + i + ": rescan " + x);
                if (raised) raisedChecks++;
            }
            int n = raisedChecks;
            org.junit.jupiter.api.Assertions.assertTrue(n > 20 && n < 2980, cases[c][0] + " exercised both states: " + n);
        }
    }
}
