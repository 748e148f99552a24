package byre.rules;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.rules.eval.Transition;
import byre.rules.eval.WatchEngine;
import byre.units.Quantity;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Instant;
import java.time.ZoneId;
import java.util.ArrayList;
import java.util.List;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;

/** The example packs under rules/examples compile cleanly for the demo farm and fire as their comments say. */
class ExamplesTest {
    static SimpleRuleContext larkmoor() {
        return new SimpleRuleContext().site("larkmoor")
                .zone("calf-pen-1", "calves").zone("calf-pen-2", "calves").zone("cow-shed", "cows")
                .channel("night-phone", "barn-siren", "office");
    }

    static List<RuleSource> examples() throws IOException {
        List<RuleSource> out = new ArrayList<>();
        try (Stream<Path> files = Files.list(Path.of("examples"))) {
            for (Path p : files.filter(f -> f.toString().endsWith(".rules")).sorted().toList()) {
                out.add(new RuleSource("examples/" + p.getFileName(), Files.readString(p)));
            }
        }
        return out;
    }

    @Test
    void examplesCompileWithoutErrorsOrWarnings() throws IOException {
        List<RuleSource> files = examples();
        assertEquals(3, files.size());
        CompileResult r = RuleCompiler.compile(files, larkmoor());
        assertEquals(List.of(), r.diagnostics(), r.render());
        assertEquals(List.of("young-calf-cold", "calf-draught", "heat-onset", "heat-alert", "heat-danger", "heat-emergency",
                "no-cool-night", "quiet-sensor", "quiet-wet-bulb", "stuck-thermometer", "dry-wick"),
                r.ruleSet().orElseThrow().watches().stream().map(Watch::name).toList());
        for (RuleSource f : files) assertTrue(f.text().contains("veterinarian"), f.name() + " carries the safety note");
    }

    @Test
    void heatBandsFireInOrderOnARisingAfternoon() throws IOException {
        WatchEngine e = new WatchEngine(RuleCompiler.compile(examples(), larkmoor()).ruleSet().orElseThrow(), ZoneId.of("Europe/London"));
        List<String> events = new ArrayList<>();
        Instant t = Instant.parse("2026-07-14T08:00:00Z");
        for (int m = 0; m <= 8 * 60; m++) {
            double thi = Math.min(86, 64 + m * 0.05); // 64 at 08:00, rising 3 THI units per hour
            List<Transition> ts = new ArrayList<>();
            for (String z : List.of("calf-pen-1", "calf-pen-2", "cow-shed")) {
                ts.addAll(e.accept(new ZoneReading(t, z, Quantity.DRY_BULB, 25 + m * 0.001)));
                ts.addAll(e.accept(new ZoneReading(t, z, Quantity.WET_BULB, 20 + m * 0.001)));
                ts.addAll(e.accept(new ZoneReading(t, z, Quantity.RH, 60)));
            }
            ts.addAll(e.accept(new ZoneReading(t, "cow-shed", Quantity.THI, thi)));
            for (Transition tr : ts) {
                events.add(tr.at().toString().substring(11, 16) + " " + tr.watch());
            }
            t = t.plusSeconds(60);
        }
        // THI reaches 68 at 09:20 and its 30-min mean at 09:35; 75 at 11:40, 79 at 13:00, 84 at 14:40.
        assertEquals(List.of("10:05 heat-onset", "12:10 heat-alert", "13:20 heat-danger", "14:50 heat-emergency"), events);
    }
}
