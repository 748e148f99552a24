package byre.daemon;

import byre.history.HistoryWriter;
import byre.notify.AlertService;
import byre.rules.ZoneReading;
import java.time.Duration;
import java.time.Instant;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * byre watching itself: a history database that cannot be written (disk full, read-only SD card)
 * raises an alert through the channels, which keep working from memory; and delivered outbox rows
 * older than a week are pruned once a day.
 */
final class SelfWatch implements Pipeline.ZoneListener {
    private static final Logger LOG = LoggerFactory.getLogger(SelfWatch.class);
    static final String HISTORY_DISK = "history-disk";
    /** A write failure must last this long before it alerts (one failed batch can be a hiccup). */
    static final Duration GRACE = Duration.ofSeconds(30);

    private final HistoryWriter writer;
    private final AlertService alerts;
    private Instant unhealthySince;
    private boolean raised;
    private final Cadence checks = new Cadence(Duration.ofSeconds(4), Duration.ofSeconds(1), Duration.ofSeconds(60));
    private Instant nextPrune = Instant.MIN;

    SelfWatch(HistoryWriter writer, AlertService alerts) {
        this.writer = writer;
        this.alerts = alerts;
    }

    @Override
    public void accept(ZoneReading r) {}

    @Override
    public Instant nextTick(Instant now) {
        return checks.nextAt(now);
    }

    @Override
    public void tick(Instant now) {
        if (!checks.due(now)) return;
        byre.history.WriterStats stats = writer.stats();
        boolean healthy = stats.healthy();
        if (healthy) {
            unhealthySince = null;
        } else if (unhealthySince == null || unhealthySince.isAfter(now)) {
            unhealthySince = now;
        }
        boolean bad = unhealthySince != null && !now.isBefore(unhealthySince.plus(GRACE));
        if (bad != raised) {
            raised = bad;
            alerts.selfAlert(HISTORY_DISK, bad, bad
                    ? "byre cannot write its history database (" + stats.lastError().orElse("unknown error")
                            + "); alerts still work. Free disk space or check the SD card."
                    : "byre writes its history database again");
        }
        if (!now.isBefore(nextPrune)) {
            nextPrune = now.plus(Duration.ofDays(1));
            try {
                alerts.outbox().prune(now.minus(Duration.ofDays(7)));
            } catch (Exception e) {
                LOG.warn("outbox prune failed: {}", e.getMessage());
            }
        }
    }
}
