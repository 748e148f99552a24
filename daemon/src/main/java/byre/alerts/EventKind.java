package byre.alerts;

/** What happened to an incident (README, Alerts and delivery), plus {@code summary} (events held back by a rate limit) and {@code digest} (the morning digest). */
public enum EventKind {
    RAISED, REMINDER, ESCALATED, CLEARED, ACKNOWLEDGED, TEST, SUMMARY, DIGEST;

    /** The lower-case word used in event JSON. */
    public String id() {
        return name().toLowerCase(java.util.Locale.ROOT);
    }

    /** The kind for a JSON word, or null when unknown. */
    public static EventKind of(String id) {
        for (EventKind k : values()) if (k.id().equals(id)) return k;
        return null;
    }
}
