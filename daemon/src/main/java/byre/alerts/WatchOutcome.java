package byre.alerts;

import java.time.Instant;

/**
 * One transition of a watch for one zone, as the rule engine reports it: RAISED when the raise condition
 * has held for its time, CLEARED when the clear condition has. {@code value} is in the quantity's canonical
 * unit, {@code unit} its symbol ("" for indices); {@code message} is already rendered.
 */
public record WatchOutcome(Kind kind, String watch, String zone, String level, String quantity, double value,
                           String unit, Instant since, Instant at, String message, AlertPolicy policy) {
    public enum Kind { RAISED, CLEARED }
}
