package byre.admin;

import java.time.Instant;

/**
 * One open (raised, not yet cleared) alert as shown by {@code GET /status} and {@code byre status}.
 * {@code acknowledgedBy}/{@code acknowledgedAt} are null while nobody has acknowledged it. {@code fromAlertState}: a
 * central byre knows this alert of a site from the site's retained alert state, not from its events.
 */
public record OpenAlert(String incident, String watch, String zone, String level, String quantity, double value,
                        Instant since, String acknowledgedBy, Instant acknowledgedAt, boolean fromAlertState) {
    public OpenAlert(String incident, String watch, String zone, String level, String quantity, double value,
                     Instant since, String acknowledgedBy, Instant acknowledgedAt) {
        this(incident, watch, zone, level, quantity, value, since, acknowledgedBy, acknowledgedAt, false);
    }

    /** The admin view of an open incident of the alert stage. */
    public static OpenAlert of(byre.alerts.OpenIncident i) {
        return new OpenAlert(i.id(), i.watch(), i.zone(), i.level(), i.quantity(), i.value(), i.since(), i.ackBy(), i.ackAt(),
                i.fromAlertState());
    }
}
