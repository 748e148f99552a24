package byre.history;

import java.util.concurrent.atomic.AtomicInteger;

/**
 * Who goes first to the file's write lock: a connection that must not wait long (the alert outbox, before an alert's
 * first delivery attempt) says here while it waits, and the history writer begins no new transaction until it has had
 * its turn. SQLite's lock is not fair: between two of the writer's back-to-back transactions (a burst of 10,000-row
 * batches, a retention round's steps) the writer takes it again within microseconds, while the waiting connection naps.
 */
public final class WriteTurn {
    private final AtomicInteger waiting = new AtomicInteger();

    /** A connection has begun to wait for the write lock. */
    public void waiting() {
        waiting.incrementAndGet();
    }

    /** That connection's transaction has ended (committed, rolled back or given up). */
    public void served() {
        waiting.decrementAndGet();
    }

    /** Whether a connection waits now. */
    public boolean anyWaiting() {
        return waiting.get() > 0;
    }
}
