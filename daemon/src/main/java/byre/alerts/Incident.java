package byre.alerts;

import java.time.Instant;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Set;

/** One open episode of a watch in a zone (or of a self-watch): what it is, whom it has told, how far it went. */
final class Incident {
    final String key;
    final String id;
    final String watch;
    final String zone;
    String level;
    String quantity;
    double value;
    String unit;
    final Instant since;
    final Instant raisedAt;
    String message;
    final AlertPolicy policy;
    final Set<String> told = new LinkedHashSet<>();
    Instant lastReminderAt;
    boolean escalated;
    String ackBy;
    Instant ackAt;

    Incident(String key, String id, String watch, String zone, String level, String quantity, double value, String unit,
             Instant since, Instant raisedAt, String message, AlertPolicy policy) {
        this.key = key;
        this.id = id;
        this.watch = watch;
        this.zone = zone;
        this.level = level;
        this.quantity = quantity;
        this.value = value;
        this.unit = unit;
        this.since = since;
        this.raisedAt = raisedAt;
        this.message = message;
        this.policy = policy;
        this.lastReminderAt = raisedAt;
    }

    boolean acknowledged() {
        return ackBy != null;
    }

    /** A read-only view for status screens and the admin API. */
    OpenIncident view() {
        return new OpenIncident(id, watch, zone, level, quantity, value, unit, since, raisedAt, message, List.copyOf(told),
                escalated, ackBy, ackAt);
    }
}
