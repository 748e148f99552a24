package byre.fuzz;

import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

import byre.rules.CompileResult;
import byre.rules.Diagnostic;
import byre.rules.RuleCompiler;
import byre.rules.RuleSource;
import byre.rules.SimpleRuleContext;
import byre.rules.ZoneReading;
import byre.rules.eval.WatchEngine;
import byre.units.Quantity;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Instant;
import java.time.ZoneId;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;

/**
 * Seeded mutation fuzzing of the rule language: mutated rule files (byte flips, truncation, grammar
 * tokens, deep nesting, odd numbers, invalid UTF-8) must give diagnostics with positions, never an
 * exception; those that compile must run in the engine without one.
 */
class RuleParserFuzzTest {
    static final String DESIGN = """
            # Heat stress in the cow barn
            watch heat-stress
              raise when cow-shed.thi >= 72 for 30m
              clear when cow-shed.thi <= 70 for 20m
              level warning
              notify night-phone
              remind every 2h
              escalate after 45m to office
              message "Heat stress in {zone}: THI {value}. Check fans and water."

            watch calf-chill
              raise when @calves.wind-chill < 5 C for 20m
              clear when @calves.wind-chill > 7 C for 15m
              level critical
              notify night-phone, barn-siren
              only between 18:00 and 08:00

            watch quiet-sensor
              raise when silent(*.dry-bulb) for 10m
              level warning
              notify office

            watch windows
              raise when (avg(cow-shed.thi, 30m) > 70 and not max(cow-shed.rh, 1h) < 40 %) or rise(cow-shed.dry-bulb, 15m) >= 3 C
              clear when hours-above(cow-shed.thi, 72, 24h) <= 2 and not stuck(cow-shed.dry-bulb, 2h)
              level info
              notify office
            """;
    static final String[] TOKENS = {"watch ", "raise when ", "clear when ", "for ", "level ", "notify ", "remind every ",
            "escalate after ", " to ", "only between ", " and ", " or ", "not ", "(", ")", "((((((((", "))))", ",", ".", "@",
            "*", "pen-*", "cow-shed", "@calves", "thi", "wind-chill", "dry-bulb", "rh", " C", " F", " %", " m/s", " kPa",
            "30m", "0s", "99999999999999d", "1e999", "-0", "<", "<=", ">", ">=", "==", "avg(", "min(", "max(", "rise(",
            "hours-above(", "silent(", "stuck(", "message \"", "\"", "{zone}", "{value}", "{", "}", "\n", "\n  ", "\t", "#",
            "24:00", "25:61", "18:00", "\u0000", "\ufeff", "info", "critical", "warning", "\\"};

    static SimpleRuleContext larkmoor() {
        return new SimpleRuleContext().zone("calf-pen-1", "calves").zone("calf-pen-2", "calves").zone("cow-shed", "cows")
                .channel("night-phone", "office", "barn-siren");
    }

    static List<String> corpus() throws Exception {
        List<String> out = new ArrayList<>(List.of(DESIGN));
        Path examples = Path.of("..", "rules", "examples");
        if (Files.isDirectory(examples)) {
            try (var files = Files.list(examples)) {
                for (Path p : files.filter(f -> f.toString().endsWith(".rules")).sorted().toList()) out.add(Files.readString(p));
            }
        }
        return out;
    }

    /** Compiles (and, when it compiles, runs) one input; returns a failure description or null. */
    static String check(byte[] input) {
        try {
            CompileResult r = RuleCompiler.compile(List.of(RuleSource.ofBytes("fuzz.rules", input)), larkmoor());
            for (Diagnostic d : r.diagnostics()) {
                if (d.line() < 1 || d.column() < 1 || d.message() == null || d.message().isBlank()) return "bad diagnostic " + d;
            }
            r.render();
            if (r.ruleSet().isPresent()) {
                WatchEngine e = new WatchEngine(r.ruleSet().get(), ZoneId.of("Europe/London"));
                Instant t = Instant.parse("2026-07-14T12:00:00Z");
                for (int i = 0; i < 50; i++) {
                    for (String z : List.of("calf-pen-1", "calf-pen-2", "cow-shed")) {
                        e.accept(new ZoneReading(t, z, Quantity.THI, 60 + i));
                        e.accept(new ZoneReading(t, z, Quantity.DRY_BULB, 20 + (i % 7)));
                        e.accept(new ZoneReading(t, z, Quantity.WIND_CHILL, 8 - i * 0.2));
                    }
                    t = t.plusSeconds(120);
                    e.tick(t);
                }
                e.restore(e.snapshot());
            }
            return null;
        } catch (RuntimeException | StackOverflowError e) {
            return Mutator.thrown(e);
        }
    }

    @Test
    void mutatedRuleFilesGiveDiagnosticsNotExceptions() throws Exception {
        long seed = Mutator.seed(4);
        Mutator m = new Mutator(seed, corpus(), TOKENS, "(", ")");
        int compiled = 0;
        int iterations = Mutator.iterations();
        for (int i = 0; i < iterations; i++) {
            byte[] input = m.next();
            String problem = check(input);
            if (problem != null) fail("input #" + i + " (seed " + seed + ") " + Mutator.literal(input) + ": " + problem);
            if (RuleCompiler.compile(List.of(RuleSource.ofBytes("fuzz.rules", input)), larkmoor()).ruleSet().isPresent()) compiled++;
        }
        assertTrue(compiled > 0, "no mutated rule file compiled: only the error paths were exercised");
    }
}
