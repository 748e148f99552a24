package byre.rules;

import static org.junit.jupiter.api.Assertions.assertFalse;

import byre.rules.eval.Transition;
import byre.rules.eval.WatchEngine;
import byre.units.Quantity;
import java.time.Instant;
import java.time.ZoneId;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

/**
 * Table-driven scenarios: rules plus a script of readings and ticks give the transitions, one line each.
 * Script lines: {@code 10:00 cows thi 73} (time [zone quantity value]) or {@code tick 10:30};
 * a time is HH:MM[:SS] on 2026-01-15 UTC, {@code +1 06:00} for the next day, or a full ISO instant.
 * Output lines: {@code 10:30 RAISED heat/cows 73.0} (seconds shown only when not zero).
 */
final class Scenario {
    static final String DAY = "2026-01-15";

    final SimpleRuleContext ctx;
    final WatchEngine engine;

    Scenario(String rules, SimpleRuleContext ctx, ZoneId zone, WatchEngine.Options options) {
        this.ctx = ctx;
        CompileResult r = RuleCompiler.compile(List.of(new RuleSource("t.rules", rules)), ctx);
        assertFalse(r.hasErrors(), r::render);
        engine = new WatchEngine(r.ruleSet().orElseThrow(), zone, options);
    }

    Scenario(String rules, SimpleRuleContext ctx) {
        this(rules, ctx, ZoneId.of("UTC"), WatchEngine.Options.replay());
    }

    static SimpleRuleContext farm() {
        return new SimpleRuleContext().site("larkmoor").defaultMaxAge(java.time.Duration.ofMinutes(30))
                .zone("cows", "cattle").zone("calf-pen-1", "calves").zone("calf-pen-2", "calves").zone("cow-shed", "cattle")
                .channel("night-phone", "barn-siren", "office");
    }

    static Instant time(String s) {
        if (s.contains("T")) return Instant.parse(s);
        int day = 0;
        if (s.startsWith("+")) {
            int sp = s.indexOf(' ');
            day = Integer.parseInt(s.substring(1, sp));
            s = s.substring(sp + 1);
        }
        String t = s.length() == 5 ? s + ":00" : s;
        return Instant.parse(DAY + "T" + t + "Z").plusSeconds(86_400L * day);
    }

    List<String> run(String script) {
        List<String> out = new ArrayList<>();
        for (String raw : script.strip().split("\n")) {
            String line = raw.strip();
            if (line.isEmpty() || line.startsWith("#")) continue;
            List<Transition> ts;
            if (line.startsWith("tick ")) {
                ts = engine.tick(time(line.substring(5).strip()));
            } else {
                String[] p = line.split("\\s+");
                int k = p[0].startsWith("+") ? 2 : 1;
                String when = k == 2 ? p[0] + " " + p[1] : p[0];
                ts = engine.accept(new ZoneReading(time(when), p[k], Quantity.byId(p[k + 1]).orElseThrow(), Double.parseDouble(p[k + 2])));
            }
            for (Transition t : ts) out.add(format(t));
        }
        return out;
    }

    static String format(Transition t) {
        String at = t.at().toString();
        String day = at.substring(0, 10);
        String clock = at.substring(11, 19);
        if (clock.endsWith(":00")) clock = clock.substring(0, 5);
        String prefix = day.equals(DAY) ? "" : day + " ";
        return prefix + clock + " " + t.kind() + " " + t.watch() + "/" + t.zone() + " " + String.format(Locale.ROOT, "%.1f", t.value());
    }
}
