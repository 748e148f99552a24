package byre.rules;

import byre.rules.eval.WatchEngine;
import byre.units.Quantity;
import java.time.Instant;
import java.time.ZoneId;
import java.util.ArrayList;
import java.util.List;

/**
 * Benchmark, not a test: readings per second through the engine with 50 watches loaded, against a
 * baseline run in the same process (the same readings through an engine with 1 watch), so the ratio
 * shows that cost grows with the watches reading a stream, not with all watches.
 * Run: mvn -q -pl rules test-compile && java -cp rules/target/classes:rules/target/test-classes byre.rules.EngineBench
 */
public final class EngineBench {
    public static void main(String[] args) {
        List<String> zones = new ArrayList<>();
        SimpleRuleContext ctx = new SimpleRuleContext().channel("office");
        for (int i = 0; i < 10; i++) {
            zones.add("pen-" + i);
            ctx.zone("pen-" + i, "pens");
        }
        StringBuilder fifty = new StringBuilder();
        Quantity[] qs = Quantity.values();
        for (int w = 0; w < 50; w++) {
            Quantity q = qs[w % qs.length];
            fifty.append("watch w").append(w).append("\n notify office\n raise when avg(@pens.").append(q.id()).append(", 30m) > ")
                    .append(50 + w).append(" for 5m\n clear when avg(@pens.").append(q.id()).append(", 30m) < ").append(40 + w).append(" for 5m\n");
        }
        String one = "watch w0\n notify office\n raise when avg(@pens.dry-bulb, 30m) > 50 for 5m\n clear when avg(@pens.dry-bulb, 30m) < 40 for 5m\n";
        int n = 4_000_000;
        Instant t0 = Instant.parse("2026-07-01T00:00:00Z");
        ZoneReading[] rs = new ZoneReading[n];
        for (int i = 0; i < n; i++) {
            rs[i] = new ZoneReading(t0.plusMillis(i * 100L), zones.get(i % zones.size()), Quantity.DRY_BULB, 20 + (i % 997) / 100.0);
        }
        for (int round = 0; round < 3; round++) {
            double base = run(one, ctx, rs);
            double full = run(fifty.toString(), ctx, rs);
            System.out.printf("round %d: 1 watch %.2f M readings/s, 50 watches %.2f M readings/s, ratio %.2f%n", round, base / 1e6, full / 1e6, full / base);
        }
    }

    private static double run(String rules, SimpleRuleContext ctx, ZoneReading[] rs) {
        WatchEngine e = new WatchEngine(RuleCompiler.compile(List.of(new RuleSource("b.rules", rules)), ctx).ruleSet().orElseThrow(), ZoneId.of("UTC"));
        long start = System.nanoTime();
        long events = 0;
        for (ZoneReading r : rs) events += e.accept(r).size();
        double secs = (System.nanoTime() - start) / 1e9;
        if (events < 0) System.out.println(events);
        return rs.length / secs;
    }
}
