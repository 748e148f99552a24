package byre.history;

import java.util.Optional;

/**
 * A snapshot of the history writer's counters and gauges ({@link HistoryWriter#stats()}); each field is read
 * once, so two fields may come from moments a batch apart.
 *
 * @param healthy              false while writes fail (the rows are kept and retried)
 * @param lastErrorText        the message of the most recent write error, null if none (kept after recovery)
 * @param rowsWritten          readings newly stored (duplicates and too-old rows not counted)
 * @param rowsDuplicate        readings ignored because their (stream, time) was already stored
 * @param rowsTooOld           readings skipped because they were older than keep-raw when written
 * @param rowsRejected         readings not queued: queue full past the timeout, writer closed, or not a finite value
 * @param rowsDropped          readings lost: oldest dropped from a full backlog during an outage, or unwritten at close
 * @param batches              committed batches (each one commit)
 * @param lastBatchRows        rows in the last committed batch
 * @param lastCommitMillis     time the last batch took, from first insert to commit
 * @param queueDepth           items waiting in the append queue
 * @param backlogRows          readings taken from the queue but not yet committed
 * @param writeErrors          failed batch commits and failed retention steps
 * @param rollupFlushes        batches that also wrote closed minute (and hour) rollup buckets
 * @param openRollupBuckets    minute buckets held in memory, not yet written
 * @param retentionSteps       retention steps run
 * @param retentionRounds      completed retention rounds
 * @param retentionRowsDeleted rows deleted by retention in total
 * @param maxRetentionStepRows the most rows any one retention step deleted
 * @param rowsSealed           raw rows packed into runs since start (see {@code RunSealer})
 * @param sealPending          raw rows older than the minute mark may still wait to be packed (after an upgrade)
 */
public record WriterStats(boolean healthy, String lastErrorText, long rowsWritten, long rowsDuplicate, long rowsTooOld,
                          long rowsRejected, long rowsDropped, long batches, long lastBatchRows, long lastCommitMillis,
                          int queueDepth, int backlogRows, long writeErrors, long rollupFlushes, int openRollupBuckets,
                          long retentionSteps, long retentionRounds, long retentionRowsDeleted, long maxRetentionStepRows,
                          long rowsSealed, boolean sealPending) {

    /** The message of the most recent write error, if any. */
    public Optional<String> lastError() { return Optional.ofNullable(lastErrorText); }
}
