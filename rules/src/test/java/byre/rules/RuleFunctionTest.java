package byre.rules;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.rules.eval.Plan;
import byre.rules.lang.RuleFunction;
import java.util.List;
import org.junit.jupiter.api.Test;

/** Each value function the language has is parsed and checked into its own plan; none falls into another's. */
class RuleFunctionTest {
    static Plan.Value raiseLeft(String value) {
        String text = "watch w\n  raise when " + value + " > 5\n  clear when " + value + " < 4\n  notify office\n";
        CompileResult r = RuleCompiler.compile(List.of(new RuleSource("barn.rules", text)), Scenario.farm());
        assertTrue(r.errors().isEmpty(), r.render());
        return ((Plan.Cmp) r.ruleSet().orElseThrow().watches().get(0).raiseCondition()).left();
    }

    @Test
    void everyFunctionHasItsOwnPlan() {
        for (RuleFunction f : RuleFunction.values()) {
            String call = f + "";
            Plan.Value v = switch (f) {
                case AVG, MIN, MAX, RISE -> raiseLeft(f.id() + "(cows.dry-bulb, 30m)");
                case HOURS_ABOVE -> raiseLeft(f.id() + "(cows.dry-bulb, 25 C, 24h)");
            };
            Object expected = switch (f) {
                case AVG -> Plan.WindowKind.AVG;
                case MIN -> Plan.WindowKind.MIN;
                case MAX -> Plan.WindowKind.MAX;
                case RISE -> Plan.WindowKind.RISE;
                case HOURS_ABOVE -> Plan.HoursAbove.class;
            };
            Object actual = v instanceof Plan.Window w ? w.kind() : v.getClass();
            assertEquals(expected, actual, call);
        }
    }
}
