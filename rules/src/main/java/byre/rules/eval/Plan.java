package byre.rules.eval;

import byre.units.Quantity;
import java.util.List;

/**
 * A checked condition: names resolved, values in canonical units, durations in milliseconds.
 * The engine binds one copy per (watch, zone) instance to live streams. Internal to the rules module.
 */
public final class Plan {
    private Plan() {}

    public enum Op { LT, LE, GT, GE, EQ;
        /** The operator the parser read; any other text is a bug, not user input. */
        public static Op of(String s) {
            return switch (s) {
                case "<" -> LT;
                case "<=" -> LE;
                case ">" -> GT;
                case ">=" -> GE;
                case "==" -> EQ;
                default -> throw new IllegalArgumentException("not a comparison: " + s);
            };
        }

        /** The same test with the operands swapped ({@code 5 < x} is {@code x > 5}). */
        public Op flip() {
            return switch (this) {
                case LT -> GT;
                case LE -> GE;
                case GT -> LT;
                case GE -> LE;
                case EQ -> EQ;
            };
        }
    }

    public enum WindowKind { AVG, MIN, MAX, RISE }

    /** A stream: a fixed zone, or (zone null) the zone of the instance. */
    public record TermPlan(String zone, Quantity quantity) {}

    public sealed interface Cond permits All, Any, Neg, Cmp, Silent, Stuck {}

    public record All(List<Cond> parts) implements Cond {}

    public record Any(List<Cond> parts) implements Cond {}

    public record Neg(Cond inner) implements Cond {}

    public record Cmp(Value left, Op op, Value right) implements Cond {}

    public record Silent(TermPlan term) implements Cond {}

    public record Stuck(TermPlan term, long windowMs) implements Cond {}

    public sealed interface Value permits Const, Latest, Window, HoursAbove {}

    public record Const(double value) implements Value {}

    public record Latest(TermPlan term) implements Value {}

    public record Window(WindowKind kind, TermPlan term, long windowMs) implements Value {}

    /** Hours within the window during which the stream was above the threshold (canonical unit). */
    public record HoursAbove(TermPlan term, double threshold, long windowMs) implements Value {}
}
