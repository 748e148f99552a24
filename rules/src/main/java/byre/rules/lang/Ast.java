package byre.rules.lang;

import java.util.List;

/** The syntax tree of rule files. Every node carries the position it starts at. */
public final class Ast {
    private Ast() {}

    /**
     * One {@code watch} block as written; clauses the user left out are null (lists: empty). {@code raise}
     * is null only when its line had a syntax error (already reported); the rest is still checked.
     * {@code clearMessage} is the text of {@code clear message "…"}, null without one.
     */
    public record Watch(String file, String name, Pos pos, When raise, When clear, Word level, List<Word> notifyTo,
                        Dur remind, Dur escalateAfter, List<Word> escalateTo, Between only, Text message,
                        Text clearMessage, boolean hadSyntaxErrors) {
    }

    /** {@code raise when ... [for D]} or {@code clear when ... [for D]}; hold null when there is no {@code for}. */
    public record When(Cond cond, Dur hold, Pos pos) {}

    public record Dur(long millis, String text, Pos pos) {}

    public record Word(String text, Pos pos) {}

    public record Text(String text, Pos pos) {}

    /** {@code only between HH:MM and HH:MM}, in minutes of the day. */
    public record Between(int startMinute, int endMinute, Pos pos, Pos endPos) {}

    public sealed interface Cond permits And, Or, Not, Compare, Silent, Stuck {
        Pos pos();
    }

    public record And(List<Cond> parts, Pos pos) implements Cond {}

    public record Or(List<Cond> parts, Pos pos) implements Cond {}

    public record Not(Cond inner, Pos pos) implements Cond {}

    /** {@code left op right}; op is one of {@code < <= > >= ==}. */
    public record Compare(Operand left, String op, Operand right, Pos pos) implements Cond {}

    public record Silent(Term term, Pos pos) implements Cond {}

    public record Stuck(Term term, Dur window, Pos pos) implements Cond {}

    public sealed interface Operand permits Num, DurationValue, TermValue, Func {
        Pos pos();
    }

    /** A number with an optional unit ({@code 5 C}); unit null when none was written. */
    public record Num(double value, String text, Word unit, Pos pos) implements Operand {}

    /** A duration used as a value (hours for {@code hours-above}). */
    public record DurationValue(Dur dur, Pos pos) implements Operand {}

    public record TermValue(Term term, Pos pos) implements Operand {}

    /** {@code avg min max rise} (threshold null) or {@code hours-above} over a trailing window. */
    public record Func(String name, Term term, Num threshold, Dur window, Pos pos) implements Operand {}

    public enum SelectorKind { ZONE, GLOB, GROUP }

    /** {@code <selector>.<quantity>}. */
    public record Term(SelectorKind kind, String selector, Pos selectorPos, String quantity, Pos quantityPos, Pos pos) {
        /** As written: {@code @calves.wind-chill}. */
        public String text() { return (kind == SelectorKind.GROUP ? "@" : "") + selector + "." + quantity; }
    }
}
