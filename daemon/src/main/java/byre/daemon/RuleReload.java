package byre.daemon;

import byre.rules.ZoneReading;
import java.time.Instant;
import java.util.function.BooleanSupplier;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Reloads the rule files on the pipeline thread: at least every two seconds it looks for a changed file, and at
 * once when asked (SIGHUP). A file with errors leaves the running rules in place. While a zone's max-age
 * is still the fixed default (nothing learnt yet), it looks hourly whether the history now tells how
 * often the sensors report, and reloads with the learnt max-age (unchanged watches carry over).
 */
final class RuleReload implements Pipeline.ZoneListener {
    private static final Logger LOG = LoggerFactory.getLogger(RuleReload.class);

    private final RuleLoader rules;
    private final WatchStage watches;
    private final BooleanSupplier asked;
    // At least every 2 s (the README's promise), at most every 1.5 s: a turn of the readings in between serves.
    private final Cadence checks = new Cadence(java.time.Duration.ofMillis(1500), java.time.Duration.ofMillis(500),
            java.time.Duration.ofSeconds(10));
    /** A new install learns its sensors' reporting intervals as the history fills: looked at hourly until known. */
    // (a step back counts from the next turn, so it must exceed the interval: else every tick would be a turn)
    private final Cadence learning = new Cadence(java.time.Duration.ofHours(1), java.time.Duration.ofHours(2));
    private final java.util.concurrent.atomic.AtomicLong loaded = new java.util.concurrent.atomic.AtomicLong();
    private final java.util.concurrent.atomic.AtomicLong refused = new java.util.concurrent.atomic.AtomicLong();

    private final Runnable writeHistory;

    RuleReload(RuleLoader rules, WatchStage watches, BooleanSupplier asked) {
        this(rules, watches, asked, () -> { });
    }

    /**
     * @param writeHistory writes what the history holds back (zone rows wait for the rollups), so that new
     *     windows are refilled with everything up to now
     */
    RuleReload(RuleLoader rules, WatchStage watches, BooleanSupplier asked, Runnable writeHistory) {
        this.rules = rules;
        this.watches = watches;
        this.asked = asked;
        this.writeHistory = writeHistory;
    }

    @Override
    public void accept(ZoneReading r) {}

    /** The next look at the files or at the history; a request (SIGHUP) wakes the pipeline itself. */
    @Override
    public Instant nextTick(Instant now) {
        Instant files = checks.nextAt(now);
        Instant history = learning.nextAt(now);
        return history.isBefore(files) ? history : files;
    }

    @Override
    public void tick(Instant now) {
        boolean requested = asked.getAsBoolean();
        boolean learn = learning.due(now) && rules.stillLearning() && rules.maxAgesChanged();
        if (!checks.due(now) && !requested && !learn) return;
        if (requested) checks.restart(now);
        if (requested || learn || rules.changed()) {
            rules.load().ifPresentOrElse(rs -> {
                writeHistory.run();
                watches.reload(rs, now);
                loaded.incrementAndGet();
            }, () -> {
                LOG.error("reload refused: the rule files have errors; the previous rules keep running");
                refused.incrementAndGet();
            });
        }
    }

    /** Reloads done since start (read on any thread: tests and the metrics see that a reload happened). */
    long loaded() {
        return loaded.get();
    }

    /** Reloads refused for errors in the rule files. */
    long refused() {
        return refused.get();
    }
}
