package byre.history;

import java.time.Duration;

/**
 * Tuning of the {@link HistoryWriter}. Build one with {@link #builder()}; every field not set keeps its
 * {@link #DEFAULT} value, and no setter changes another field.
 *
 * @param batchRows         a batch is committed once this many rows wait
 * @param commitEvery       ... or once the oldest waiting row has waited this long (zero: at once). QoS 1
 *                          acknowledgements wait for the commit that holds their reading, so at most this much of
 *                          the readings is held only by the broker
 * @param queueCapacity     rows the append queue holds before {@code append} waits
 * @param appendTimeout     how long {@code append} waits for room in the queue
 * @param backlogLimit      rows kept in memory while the database cannot be written; then the oldest are dropped
 * @param retentionEvery    how often a retention round starts
 * @param retentionStepRows rows one retention step deletes at most
 * @param maxRetryDelay     the longest pause between retries of a failed batch
 * @param firstBatchAtOnce  whether the very first batch after start is committed at once (the first stored reading
 *                          shows in the log within a second of start)
 * @param stallPause        a pause in arrivals this long with acknowledgements held commits at once (the broker is
 *                          waiting on byre); short for the embedded broker, whose in-flight window is only 10
 */
public record WriterSettings(int batchRows, Duration commitEvery, int queueCapacity, Duration appendTimeout,
                             int backlogLimit, Duration retentionEvery, int retentionStepRows, Duration maxRetryDelay,
                             boolean firstBatchAtOnce, Duration stallPause) {

    /**
     * 10,000 rows or 2 s per batch (a burst is written in large transactions; at barn rates a commit every 2 s,
     * which is what wears an SD card); a 20,000-row queue (about 20 s of a 1000 rows/s burst) with a 1 s append
     * wait; a 200,000-row backlog for database outages (about 8 MB, 11 hours of 50 sensors every 10 s);
     * a retention round every 10 minutes in steps of 5000 rows; retries up to every 30 s.
     */
    public static final WriterSettings DEFAULT = new WriterSettings(10_000, Duration.ofSeconds(2), 20_000, Duration.ofSeconds(1),
        200_000, Duration.ofMinutes(10), 5000, Duration.ofSeconds(30), true, Duration.ofMillis(50));

    public WriterSettings {
        if (batchRows < 1) throw new IllegalArgumentException("history batch rows must be at least 1, got " + batchRows);
        if (queueCapacity < 1) throw new IllegalArgumentException("history queue capacity must be at least 1, got " + queueCapacity);
        if (backlogLimit < batchRows) {
            throw new IllegalArgumentException("history backlog limit (" + backlogLimit + ") must be at least the batch size (" + batchRows + ")");
        }
        if (retentionStepRows < 1) throw new IllegalArgumentException("history retention step must be at least 1 row, got " + retentionStepRows);
        if (commitEvery == null || commitEvery.isNegative()) throw new IllegalArgumentException("history commit interval must be zero or positive, got " + commitEvery);
        positive("retention interval", retentionEvery);
        positive("max retry delay", maxRetryDelay);
        positive("stall pause", stallPause);
        if (appendTimeout == null || appendTimeout.isNegative()) throw new IllegalArgumentException("history append timeout must be zero or positive");
    }

    private static void positive(String what, Duration d) {
        if (d == null || d.isNegative() || d.isZero()) throw new IllegalArgumentException("history " + what + " must be positive, got " + d);
    }

    /** A builder starting from {@link #DEFAULT}. */
    public static Builder builder() {
        return new Builder(DEFAULT);
    }

    /** Sets one field per call; {@link #build()} checks them together. */
    public static final class Builder {
        private int batchRows;
        private Duration commitEvery;
        private int queueCapacity;
        private Duration appendTimeout;
        private int backlogLimit;
        private Duration retentionEvery;
        private int retentionStepRows;
        private Duration maxRetryDelay;
        private boolean firstBatchAtOnce;
        private Duration stallPause;

        private Builder(WriterSettings s) {
            batchRows = s.batchRows;
            commitEvery = s.commitEvery;
            queueCapacity = s.queueCapacity;
            appendTimeout = s.appendTimeout;
            backlogLimit = s.backlogLimit;
            retentionEvery = s.retentionEvery;
            retentionStepRows = s.retentionStepRows;
            maxRetryDelay = s.maxRetryDelay;
            firstBatchAtOnce = s.firstBatchAtOnce;
            stallPause = s.stallPause;
        }

        public Builder batchRows(int rows) { batchRows = rows; return this; }

        public Builder commitEvery(Duration d) { commitEvery = d; return this; }

        public Builder queueCapacity(int rows) { queueCapacity = rows; return this; }

        public Builder appendTimeout(Duration d) { appendTimeout = d; return this; }

        public Builder backlogLimit(int rows) { backlogLimit = rows; return this; }

        public Builder retention(Duration every, int stepRows) { retentionEvery = every; retentionStepRows = stepRows; return this; }

        public Builder maxRetryDelay(Duration d) { maxRetryDelay = d; return this; }

        public Builder firstBatchAtOnce(boolean atOnce) { firstBatchAtOnce = atOnce; return this; }

        public Builder stallPause(Duration d) { stallPause = d; return this; }

        public WriterSettings build() {
            return new WriterSettings(batchRows, commitEvery, queueCapacity, appendTimeout, backlogLimit, retentionEvery,
                retentionStepRows, maxRetryDelay, firstBatchAtOnce, stallPause);
        }
    }
}
