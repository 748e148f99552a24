package byre.rules.lang;

import java.util.Arrays;
import java.util.List;

/** The functions that give a value over a trailing window, under the names rule files use. */
public enum RuleFunction {
    AVG("avg"),
    MIN("min"),
    MAX("max"),
    RISE("rise"),
    HOURS_ABOVE("hours-above");

    private final String id;

    RuleFunction(String id) { this.id = id; }

    public String id() { return id; }

    public static List<String> ids() {
        return Arrays.stream(values()).map(RuleFunction::id).toList();
    }

    /** The function of a name the parser accepted; any other name is a bug, not user input. */
    public static RuleFunction of(String id) {
        for (RuleFunction f : values()) if (f.id.equals(id)) return f;
        throw new IllegalArgumentException("not a value function: " + id);
    }
}
