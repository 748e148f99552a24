package byre.rules.eval;

import byre.rules.Level;
import java.time.Instant;

/**
 * An alert event the engine emits: a watch instance was raised or cleared.
 *
 * @param quantity id of the quantity of the first term of the raise condition ({@code thi})
 * @param value    the value of the first value in the raise condition at {@code at}, canonical unit; NaN if none
 * @param unit     canonical unit symbol of {@code quantity} ("" for indices)
 * @param since    when the episode began: the raise condition first became true
 * @param message  raised: the watch's own {@code message} with placeholders filled ("" without a message line);
 *                 cleared: its {@code clear message} filled ("" without one: the all-clear never repeats the raise's advice)
 */
public record Transition(Kind kind, String watch, String zone, Level level, String quantity, double value, String unit,
                         Instant since, Instant at, String message) {
    public enum Kind {
        RAISED, CLEARED;

        /** The event name in the event JSON: {@code raised}, {@code cleared}. */
        public String event() { return name().toLowerCase(); }
    }
}
