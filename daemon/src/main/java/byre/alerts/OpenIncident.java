package byre.alerts;

import java.time.Instant;
import java.util.List;

/** A snapshot of one open incident (for {@code byre status} and the admin API). {@code ackBy} is null until acknowledged. */
public record OpenIncident(String id, String watch, String zone, String level, String quantity, double value, String unit,
                           Instant since, Instant raisedAt, String message, List<String> told, boolean escalated,
                           String ackBy, Instant ackAt) {}
