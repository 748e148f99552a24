package byre.alerts;

import java.time.Instant;
import java.util.List;

/**
 * A snapshot of one open incident (for {@code byre status} and the admin API). {@code ackBy} is null until acknowledged.
 * {@code fromAlertState}: a central byre knows it from the site's retained alert state, not from the site's events.
 */
public record OpenIncident(String id, String watch, String zone, String level, String quantity, double value, String unit,
                           Instant since, Instant raisedAt, String message, List<String> told, boolean escalated,
                           String ackBy, Instant ackAt, boolean fromAlertState) {
    /** How the page and {@code byre status} mark an incident known from the site's alert state. */
    public static final String FROM_ALERT_STATE = "known from the site's alert state";

    /** An incident known from its events (every barn's own, and the sites' at a centre). */
    public OpenIncident(String id, String watch, String zone, String level, String quantity, double value, String unit,
                        Instant since, Instant raisedAt, String message, List<String> told, boolean escalated,
                        String ackBy, Instant ackAt) {
        this(id, watch, zone, level, quantity, value, unit, since, raisedAt, message, told, escalated, ackBy, ackAt, false);
    }
}
