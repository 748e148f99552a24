package byre.rules.eval;

/** The four states of one (watch, zone) instance; saved state and metric labels use the lower-case names. */
public enum AlertState {
    /** Raise condition not met (or outside the only-between window). */
    CLEAR,
    /** Raise condition met, its hold time running; no event yet. */
    HOLDING,
    /** Alert raised; the {@code raised} event was emitted. */
    RAISED,
    /** Clear condition met, clear hold running; still counts as raised. */
    CLEARING;

    /** The word shown to users (status, metric labels): {@code holding}. */
    public String id() {
        return name().toLowerCase(java.util.Locale.ROOT);
    }

    /**
     * The state of a saved snapshot line. Earlier versions saved the holding state as {@code PENDING}; such a
     * snapshot is read as {@link #HOLDING}, so an upgrade keeps its running holds and raised alerts.
     */
    public static AlertState fromSaved(String word) {
        if ("PENDING".equals(word)) return HOLDING;
        return valueOf(word);
    }
}
