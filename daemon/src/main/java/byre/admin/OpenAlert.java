package byre.admin;

import java.time.Instant;

/**
 * One open (raised, not yet cleared) alert as shown by {@code GET /status} and {@code byre status}.
 * {@code acknowledgedBy}/{@code acknowledgedAt} are null while nobody has acknowledged it.
 */
public record OpenAlert(String incident, String watch, String zone, String level, String quantity, double value,
                        Instant since, String acknowledgedBy, Instant acknowledgedAt) {
}
