package byre.rules;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.rules.eval.Plan;
import byre.units.Quantity;
import java.time.Duration;
import java.time.LocalTime;
import java.util.List;
import org.junit.jupiter.api.Test;

/** Every construct of the rule language (README, Rule language), and every diagnostic with its exact text and position. */
class GrammarTest {
    static final String DESIGN_EXAMPLES = """
            # Heat stress in the cow barn
            watch heat-stress
              raise when cows.thi >= 72 for 30m
              clear when cows.thi <= 70 for 20m
              level warning
              notify night-phone
              remind every 2h
              escalate after 45m to office
              message "Heat stress in {zone}: THI {value}. Check fans and water."

            # Cold, windy night in the calf pens: one alert per calf zone
            watch calf-chill
              raise when @calves.wind-chill < 5 C for 20m
              clear when @calves.wind-chill > 7 C for 15m
              level critical
              notify night-phone, barn-siren
              only between 18:00 and 08:00

            # A sensor that stops talking is an alert, never silence
            watch quiet-sensor
              raise when silent(*.dry-bulb) for 10m
              level warning
              notify office
            """;

    static CompileResult compile(String src) {
        return RuleCompiler.compile(List.of(new RuleSource("barn.rules", src)), Scenario.farm());
    }

    static List<String> headlines(String src) {
        return compile(src).diagnostics().stream().map(Diagnostic::headline).toList();
    }

    /** Wraps a body line into a valid watch so that one line's diagnostics can be tested alone. */
    static List<String> inWatch(String... lines) {
        return headlines("watch w\n  notify office\n" + String.join("\n", lines) + "\n");
    }

    @Test
    void designExamplesCompileWithoutDiagnostics() {
        CompileResult r = compile(DESIGN_EXAMPLES);
        assertEquals(List.of(), r.diagnostics(), r.render());
        RuleSet set = r.ruleSet().orElseThrow();
        Watch heat = set.watch("heat-stress").orElseThrow();
        assertEquals(Level.WARNING, heat.level());
        assertEquals(List.of("night-phone"), heat.notifyChannels());
        assertEquals(Duration.ofHours(2), heat.remindEvery().orElseThrow());
        assertEquals(Duration.ofMinutes(45), heat.escalateAfter().orElseThrow());
        assertEquals(List.of("office"), heat.escalateTo());
        assertEquals("Heat stress in {zone}: THI {value}. Check fans and water.", heat.messageTemplate());
        assertEquals(Duration.ofMinutes(30), heat.raiseHold());
        assertEquals(Duration.ofMinutes(20), heat.clearHold());
        assertEquals(List.of("cows"), heat.zones());
        assertEquals(Quantity.THI, heat.quantity());

        Watch chill = set.watch("calf-chill").orElseThrow();
        assertEquals(List.of("calf-pen-1", "calf-pen-2"), chill.zones());
        assertEquals(Level.CRITICAL, chill.level());
        assertEquals(List.of("night-phone", "barn-siren"), chill.notifyChannels());
        assertEquals(new TimeWindow(LocalTime.of(18, 0), LocalTime.of(8, 0)), chill.onlyBetween().orElseThrow());
        assertTrue(chill.remindEvery().isEmpty());

        Watch quiet = set.watch("quiet-sensor").orElseThrow();
        assertEquals(List.of("cows", "calf-pen-1", "calf-pen-2", "cow-shed"), quiet.zones());
        assertEquals(Duration.ofMinutes(10), quiet.clearHold(), "no clear line: clears after the raise hold");
        assertFalse(quiet.hasClearCondition());
        assertEquals(Watch.DEFAULT_MESSAGE, quiet.messageTemplate());
    }

    @Test
    void unitsAreConvertedToCanonicalAtCheckTime() {
        RuleSet set = compile("""
                watch a
                  raise when cows.dry-bulb > 41 F and cows.air-speed >= 36 km/h and rise(cows.dry-bulb, 15m) > 9 F
                  clear when cows.pressure < 1013 hPa or cows.rh == 80 % or cows.dry-bulb < 278.15 K
                  notify office
                """).ruleSet().orElseThrow();
        Plan.All raise = (Plan.All) set.watch("a").orElseThrow().raiseCondition();
        assertEquals(5.0, constOf(raise.parts().get(0)), 1e-9, "41 F = 5 C (common practice)");
        assertEquals(10.0, constOf(raise.parts().get(1)), 1e-9, "36 km/h = 10 m/s (common practice)");
        assertEquals(5.0, constOf(raise.parts().get(2)), 1e-9, "a rise of 9 F is a rise of 5 C, no offset (common practice)");
        Plan.Any clear = (Plan.Any) set.watch("a").orElseThrow().clearCondition();
        assertEquals(101.3, constOf(clear.parts().get(0)), 1e-9, "1013 hPa = 101.3 kPa (common practice)");
        assertEquals(80.0, constOf(clear.parts().get(1)), 1e-9);
        assertEquals(5.0, constOf(clear.parts().get(2)), 1e-9, "278.15 K = 5 C (common practice)");
    }

    private static double constOf(Plan.Cond c) {
        Plan.Cmp cmp = (Plan.Cmp) c;
        return ((Plan.Const) (cmp.right() instanceof Plan.Const ? cmp.right() : cmp.left())).value();
    }

    @Test
    void everyConstructParses() {
        CompileResult r = compile("""
                watch all-of-it   # trailing comment
                \traise when not (avg(cows.thi, 30m) > 70 or min(@calves.dry-bulb, 1h) <= 2 C) and max(@calves.rh, 2h) >= 95 % and rise(@calves.dry-bulb, 15m) > 2 C and hours-above(@calves.dry-bulb, 25 C, 24h) >= 6h for 1h30m
                \tclear when 70 > cows.thi and stuck(@calves.rh, 2h) == 0 or not stuck(@calves.rh, 2h) and not silent(@calves.dry-bulb) for 30s
                  level info
                  notify office
                  notify night-phone, barn-siren
                  remind every 1d
                  escalate after 0m to night-phone
                  only between 22:30 and 05:00
                  message "{watch} {zone} {quantity} {value} {unit} {level} {since} {site} \\"quoted\\""
                """);
        // stuck(...) == 0 is not a value comparison: it is reported, everything else parses.
        assertEquals(List.of("barn.rules:3:31: stuck(...) is a condition, not a value: use it without a comparison"),
                r.diagnostics().stream().map(Diagnostic::headline).toList());
        r = compile("""
                watch all-of-it
                  raise when not (avg(cows.thi, 30m) > 70 or min(@calves.dry-bulb, 1h) <= 2 C) and max(@calves.rh, 2h) >= 95 % and rise(@calves.dry-bulb, 15m) > 2 C and hours-above(@calves.dry-bulb, 25 C, 24h) >= 6h for 1h30m
                  clear when 70 > cows.thi or not stuck(@calves.rh, 2h) and not silent(@calves.dry-bulb) for 30s
                  level info
                  notify office
                  notify night-phone, barn-siren
                  remind every 1d
                  escalate after 0m to night-phone
                  only between 22:30 and 05:00
                  message "{watch} {zone} {quantity} {value} {unit} {level} {since} {site} \\"quoted\\""
                """);
        assertEquals(List.of(), r.diagnostics(), r.render());
        Watch w = r.ruleSet().orElseThrow().watch("all-of-it").orElseThrow();
        assertEquals(List.of("office", "night-phone", "barn-siren"), w.notifyChannels());
        assertEquals(Duration.ofMinutes(90), w.raiseHold());
        assertEquals(Duration.ofSeconds(30), w.clearHold());
        assertEquals(List.of("calf-pen-1", "calf-pen-2"), w.zones());
        assertTrue(w.messageTemplate().endsWith("\"quoted\""));
    }

    @Test
    void renderShowsSourceLineAndCaret() {
        CompileResult r = compile("watch w\n  raise when cowz.thi >= 72\n  notify office\n");
        assertEquals("""
                barn.rules:2:14: unknown zone 'cowz' (did you mean 'cows'?)
                  raise when cowz.thi >= 72
                             ^~~~""", r.render());
    }

    @Test
    void syntaxDiagnostics() {
        assertEquals(List.of("barn.rules:3:1: unknown keyword 'rasie' (did you mean 'raise'?)"),
                inWatch("rasie when cows.thi > 72"));
        assertEquals(List.of("barn.rules:1:1: 'raise' must be inside a watch block; start one with 'watch <name>'"),
                headlines("raise when cows.thi > 72\n"));
        assertEquals(List.of("barn.rules:1:7: watch 'w' has no 'raise when' line"), headlines("watch w\n notify office\n"));
        assertEquals(List.of("barn.rules:1:7: expected a watch name (letters, digits, '-' and '_', starting with a letter) after 'watch', found '9'"),
                headlines("watch 9x\n"));
        assertEquals(List.of("barn.rules:3:7: expected 'when' after 'raise', found 'cows'"), inWatch("raise cows.thi > 72"));
        assertEquals(List.of("barn.rules:3:21: expected a comparison (< <= > >= ==) after 'cows.thi', found '72'"),
                inWatch("raise when cows.thi 72"));
        assertEquals(List.of("barn.rules:3:21: '=' is not a comparison; write '=='"), inWatch("raise when cows.thi = 72"));
        assertEquals(List.of("barn.rules:3:21: '!=' is not part of the language; write 'not (a == b)'"), inWatch("raise when cows.thi != 72"));
        assertEquals(List.of("barn.rules:3:12: 'thi' needs a zone: write '<zone>.thi', '@<group>.thi' or '*.thi'"), inWatch("raise when thi > 72"));
        assertEquals(List.of("barn.rules:3:12: unknown function 'avgg' (did you mean 'avg'?)"), inWatch("raise when avgg(cows.thi, 30m) > 72"));
        assertEquals(List.of("barn.rules:3:30: '30' needs a time unit: write e.g. 30m (s, m, h or d)"), inWatch("raise when cows.thi > 72 for 30"));
        assertEquals(List.of("barn.rules:3:30: expected a duration such as 30s, 20m, 2h or 1d after 'for', found 'soon'"), inWatch("raise when cows.thi > 72 for soon"));
        assertEquals(List.of("barn.rules:3:33: unexpected 'please' at the end of the line"), inWatch("raise when cows.thi > 72 for 3m please"));
        assertEquals(List.of("barn.rules:3:26: expected ')' to close the '(' at column 12, found the end of the line"), inWatch("raise when (cows.thi > 72"));
        assertEquals(List.of("barn.rules:3:24: expected ',' in avg(...), found ')'"), inWatch("raise when avg(cows.thi) > 72"));
        assertEquals(List.of("barn.rules:4:9: unterminated string: add a closing '\"' on the same line"), inWatch("raise when cows.thi > 72", "message \"oops"));
        assertEquals(List.of("barn.rules:4:14: '25:00' is not a time of day; write HH:MM from 00:00 to 23:59"), inWatch("raise when cows.thi > 72", "only between 25:00 and 08:00"));
        assertEquals(List.of("barn.rules:4:14: 'only between 08:00 and 08:00' is an empty window; use two different times"),
                inWatch("raise when silent(cows.thi)", "only between 08:00 and 08:00"));
        assertEquals(List.of("barn.rules:4:1: second 'raise when' in watch 'w' (the first is on line 3)"),
                inWatch("raise when silent(cows.thi)", "raise when cows.thi > 73"));
        assertEquals(List.of("barn.rules:3:23: unexpected character '$'"), inWatch("raise when cows.thi > $72"));
        assertEquals(List.of("barn.rules:3:12: silent(...) is a condition, not a value: use it without a comparison"),
                inWatch("raise when silent(cows.thi) > 1"));
        assertEquals(List.of("barn.rules:3:12: expected a value such as 'cows.thi', 'avg(cows.thi, 30m)' or '72', found 'cows'"), inWatch("raise when cows > 72"));
    }

    @Test
    void groupsThatMayGrowWarnInsteadOfRefusing() {
        // A central byre that takes in the sites it finds: "sites" and "dairy" gain zones while it runs.
        SimpleRuleContext ctx = new SimpleRuleContext().zone("hub-office").channel("office").growing("sites", "dairy");
        CompileResult r = RuleCompiler.compile(List.of(new RuleSource("sites.rules", """
                watch site-down
                  raise when @sites.online == 0
                  clear when @sites.online == 1
                  notify office
                watch sheds-hot
                  raise when */cow-shed.thi > 80
                  clear when */cow-shed.thi < 78
                  notify office
                """)), ctx);
        assertEquals(List.of("sites.rules:2:15: warning: group '@sites' has no zones yet; the sites found later join it",
                "sites.rules:3:15: warning: group '@sites' has no zones yet; the sites found later join it",
                "sites.rules:6:14: warning: selector '*/cow-shed' matches no zone yet; it takes the zones of sites found later that match it",
                "sites.rules:7:14: warning: selector '*/cow-shed' matches no zone yet; it takes the zones of sites found later that match it"),
                r.diagnostics().stream().map(Diagnostic::headline).toList());
        assertEquals(List.of(), r.ruleSet().orElseThrow().watch("site-down").orElseThrow().zones(), "no alert until a site joins");
        CompileResult other = RuleCompiler.compile(List.of(new RuleSource("sites.rules", "watch w\n  raise when @beef.thi > 80\n  notify office\n")), ctx);
        assertEquals(List.of("sites.rules:2:15: unknown group '@beef'"), other.diagnostics().stream().map(Diagnostic::headline).toList(),
                "a group that cannot grow is still unknown");
    }

    @Test
    void nameDiagnostics() {
        assertEquals(List.of("barn.rules:3:12: unknown zone 'cowz' (did you mean 'cows'?)"), inWatch("raise when cowz.thi > 72"));
        assertEquals(List.of("barn.rules:3:12: unknown zone 'calves'; 'calves' is a group: write '@calves'"), inWatch("raise when calves.thi > 72"));
        assertEquals(List.of("barn.rules:3:13: unknown group '@calfs' (did you mean '@calves'?)"), inWatch("raise when @calfs.thi > 72"));
        assertEquals(List.of("barn.rules:3:12: selector 'pen-*' matches no zone"), inWatch("raise when pen-*.thi > 72"));
        assertEquals(List.of("barn.rules:3:17: unknown quantity 'windchill' (did you mean 'wind-chill'?)"), inWatch("raise when cows.windchill < 5 C"));
        assertEquals(List.of("barn.rules:1:7: watch 'w' has no 'notify' line: its alerts reach no channel".replace("barn", "barn"))
                        .stream().map(s -> s.replace("1:7: ", "1:7: warning: ")).toList(),
                headlines("watch w\n  raise when silent(cows.thi)\n"));
        assertEquals(List.of("barn.rules:4:8: unknown channel 'nigth-phone' (did you mean 'night-phone'?)"),
                inWatch("raise when silent(cows.thi)", "notify nigth-phone"));
        assertEquals(List.of("barn.rules:4:22: unknown channel 'ofice' (did you mean 'office'?)"),
                inWatch("raise when silent(cows.thi)", "escalate after 1h to ofice"));
        assertEquals(List.of("barn.rules:4:7: unknown level 'urgent'; levels are info, warning and critical"),
                inWatch("raise when silent(cows.thi)", "level urgent"));
        assertEquals(List.of("barn.rules:4:7: unknown level 'critcal' (did you mean 'critical'?); levels are info, warning and critical"),
                inWatch("raise when silent(cows.thi)", "level critcal"));
        assertEquals(List.of("barn.rules:4:13: unknown placeholder '{zoen}' (did you mean '{zone}'?); placeholders are {watch} {zone} {quantity} {value} {unit} {level} {since} {site}"),
                inWatch("raise when silent(cows.thi)", "message \"in {zoen}\""));
        assertEquals(List.of("barn.rules:4:16: unknown placeholder '{vaule}' (did you mean '{value}'?); placeholders are {watch} {zone} {quantity} {value} {unit} {level} {since} {site}"),
                inWatch("raise when silent(cows.thi)", "clear message \"{vaule}\""));
        assertEquals(List.of("barn.rules:4:7: expected 'when' or 'message' after 'clear', found 'mesage' (did you mean 'message'?)"),
                inWatch("raise when silent(cows.thi)", "clear mesage \"done\""));
        assertEquals(List.of("barn.rules:4:14: expected a quoted message after 'clear message', found the end of the line"),
                inWatch("raise when silent(cows.thi)", "clear message"));
        assertEquals(List.of("barn.rules:5:1: second 'clear message' in watch 'w'"),
                inWatch("raise when silent(cows.thi)", "clear message \"a\"", "clear message \"b\""));
        assertEquals(List.of("barn.rules:3:7: watch 'w' is already defined at barn.rules:1"),
                headlines("watch w\n raise when silent(cows.thi)\nwatch w\n raise when silent(cows.rh)\n notify office\n").stream()
                        .filter(s -> !s.contains("warning")).toList());
        assertEquals(List.of("barn.rules:3:28: '@calves' matches other zones than '*' (line 3): a watch makes one alert per zone, so its selectors must match the same zones"),
                inWatch("raise when *.thi > 72 and @calves.thi > 70"));
    }

    @Test
    void unitDiagnostics() {
        assertEquals(List.of("barn.rules:3:32: unit 'm/s' is a speed, but 'wind-chill' is a temperature: use C, F or K"),
                inWatch("raise when cows.wind-chill < 5 m/s", "clear when cows.wind-chill > 7 C"));
        assertEquals(List.of("barn.rules:3:26: 'thi' is an index without a unit: write the bare number"), inWatch("raise when cows.thi > 72 C"));
        assertEquals(List.of("barn.rules:3:31: unknown unit 'Celsius' (did you mean 'C'?)"), inWatch("raise when cows.dry-bulb > 30 Celsius", "clear when cows.dry-bulb < 28 C"));
        assertEquals(List.of("barn.rules:3:31: unknown unit 'mps' (did you mean 'm/s'?)"), inWatch("raise when cows.air-speed < 1 mps", "clear when cows.air-speed > 2 m/s"));
        assertEquals(List.of("barn.rules:3:12: this comparison has no stream on either side"), inWatch("raise when 1 < 2"));
        assertEquals(List.of("barn.rules:3:23: cannot compare 'cows.thi' with 'cows.rh': index vs relative humidity"), inWatch("raise when cows.thi > cows.rh"));
        assertEquals(List.of("barn.rules:3:47: hours-above(...) counts hours: compare it with a bare number of hours or a duration such as 6h"),
                inWatch("raise when hours-above(cows.thi, 72, 24h) > 6 C"));
        assertEquals(List.of("barn.rules:3:23: a duration only compares with hours-above(...); 'cows.thi' is index"), inWatch("raise when cows.thi > 6h"));
        assertEquals(List.of("barn.rules:3:26: a window must be longer than 0s"), inWatch("raise when avg(cows.thi, 0s) > 72"));
        assertEquals(List.of("barn.rules:3:26: window 40d is longer than 31d"), inWatch("raise when avg(cows.thi, 40d) > 72"));
    }

    @Test
    void warnings() {
        assertEquals(List.of("barn.rules:3:1: warning: watch 'w' has no 'clear when' line, so it has no hysteresis band: it clears when the raise condition has been false for 30m"),
                inWatch("raise when cows.thi >= 72 for 30m"));
        assertEquals(List.of("barn.rules:3:1: warning: watch 'w' has no 'clear when' line, so it has no hysteresis band: it clears as soon as the raise condition is false"),
                inWatch("raise when cows.thi >= 72"));
        assertEquals(List.of("barn.rules:4:24: warning: clear threshold 74 is above the raise threshold 72: both conditions can hold at once and the watch will flap; put it below 72"),
                inWatch("raise when cows.thi >= 72", "clear when cows.thi <= 74"));
        assertEquals(List.of("barn.rules:4:30: warning: clear threshold 3 C is below the raise threshold 5 C: both conditions can hold at once and the watch will flap; put it above 5 C"),
                inWatch("raise when cows.wind-chill < 5 C", "clear when cows.wind-chill > 3 C"));
        assertEquals(List.of("barn.rules:4:12: warning: clear threshold 72 equals the raise threshold 72: there is no hysteresis band"),
                inWatch("raise when cows.thi >= 72", "clear when 72 > cows.thi"));
        // Same threshold in other units: 41 F is 5 C.
        assertEquals(List.of("barn.rules:4:30: warning: clear threshold 41 F equals the raise threshold 5 C: there is no hysteresis band"),
                inWatch("raise when cows.wind-chill < 5 C", "clear when cows.wind-chill > 41 F"));
        assertEquals(List.of("barn.rules:4:14: warning: 'remind every 4m' is under 5 minutes; frequent reminders teach people to ignore alerts"),
                inWatch("raise when silent(cows.thi)", "remind every 4m"));
        assertEquals(List.of("barn.rules:3:30: warning: '5' has no unit; it is read as 5 C (write e.g. '5 C')"),
                inWatch("raise when cows.wind-chill < 5", "clear when cows.wind-chill > 7 C"));
        SimpleRuleContext ctx = Scenario.farm().interval("cows", Quantity.THI, Duration.ofMinutes(1));
        CompileResult r = RuleCompiler.compile(List.of(new RuleSource("barn.rules",
                "watch w\n notify office\n raise when cows.thi > 72 for 30s\n clear when cows.thi < 70 for 2m\n")), ctx);
        assertEquals(List.of("barn.rules:3:31: warning: hold time 30s is shorter than the 1m reporting interval of cows.thi: the condition rests on a single reading"),
                r.diagnostics().stream().map(Diagnostic::headline).toList());
        assertTrue(r.ruleSet().isPresent(), "warnings do not stop a rule set");
    }

    @Test
    void zonesWithoutTheStreamAreSkippedWithAWarning() {
        SimpleRuleContext ctx = Scenario.farm().quantities("cow-shed", Quantity.DRY_BULB).quantities("cows", Quantity.DRY_BULB);
        CompileResult r = RuleCompiler.compile(List.of(new RuleSource("barn.rules",
                "watch w\n notify office\n raise when *.wind-chill < 5 C\n clear when *.wind-chill > 7 C\n")), ctx);
        assertEquals(List.of("barn.rules:3:13: warning: zone 'cows' matched by '*' has no 'wind-chill' stream; the watch skips it",
                        "barn.rules:3:13: warning: zone 'cow-shed' matched by '*' has no 'wind-chill' stream; the watch skips it"),
                r.diagnostics().stream().map(Diagnostic::headline).toList());
        assertEquals(List.of("calf-pen-1", "calf-pen-2"), r.ruleSet().orElseThrow().watch("w").orElseThrow().zones());
        r = RuleCompiler.compile(List.of(new RuleSource("barn.rules",
                "watch w\n notify office\n raise when cows.wind-chill < 5 C\n clear when cows.wind-chill > 7 C\n")), ctx);
        assertEquals(List.of("barn.rules:3:18: zone 'cows' has no 'wind-chill' stream", "barn.rules:4:18: zone 'cows' has no 'wind-chill' stream"), r.diagnostics().stream().map(Diagnostic::headline).toList());
    }

    @Test
    void everyProblemOfAFileAtOnceAcrossFiles() {
        CompileResult r = RuleCompiler.compile(List.of(
                new RuleSource("a.rules", "watch a\n rasie when x\n notify nigth-phone\n level warn\n"),
                new RuleSource("b.rules", "watch b\n raise when cowz.thi > 72 and cows.thii > 3\n notify office\n")), Scenario.farm());
        assertEquals(List.of(
                "a.rules:2:2: unknown keyword 'rasie' (did you mean 'raise'?)",
                "a.rules:3:9: unknown channel 'nigth-phone' (did you mean 'night-phone'?)",
                "a.rules:4:8: unknown level 'warn'; levels are info, warning and critical",
                "b.rules:2:13: unknown zone 'cowz' (did you mean 'cows'?)",
                "b.rules:2:36: unknown quantity 'thii' (did you mean 'thi'?)"), r.diagnostics().stream().map(Diagnostic::headline).toList());
        assertTrue(r.ruleSet().isEmpty());
    }
}
