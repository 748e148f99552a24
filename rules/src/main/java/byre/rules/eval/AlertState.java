package byre.rules.eval;

/** The four states of one (watch, zone) instance. */
public enum AlertState {
    /** Raise condition not met (or outside the only-between window). */
    CLEAR,
    /** Raise condition met, hold time running; no event yet. */
    PENDING,
    /** Alert raised; the {@code raised} event was emitted. */
    RAISED,
    /** Clear condition met, clear hold running; still counts as raised. */
    CLEARING
}
