package byre.notify;

import byre.time.Ticker;
import java.sql.Connection;
import java.sql.SQLException;
import java.time.Duration;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.locks.LockSupport;
import org.sqlite.BusyHandler;

/**
 * How the outbox's connection waits for SQLite's write lock while another connection to the file holds it (the history
 * writer's batch, a state save, another thread's delivery mark): it tries again after 0.1 ms, doubling up to 1 ms, for
 * at most {@link #LIMIT}. SQLite's own busy timeout sleeps 1, 2, 5, 10, 15, 20, 25 ... 100 ms between tries, so a lock
 * held for 1.2 ms cost an alert's commit 3 ms and one held for 4 ms cost it 8; with this the wait ends within a
 * millisecond of the lock's release. Used by one thread at a time (the outbox synchronizes on its connection).
 */
final class ShortBusyWait extends BusyHandler {
    /** As long as the history's connections wait (HistoryStore's busy timeout); then the statement fails as busy. */
    static final Duration LIMIT = Duration.ofSeconds(5);
    private static final long FIRST_NAP_NANOS = TimeUnit.MICROSECONDS.toNanos(100);
    private static final long MAX_NAP_NANOS = TimeUnit.MILLISECONDS.toNanos(1);

    private final Ticker ticker;
    private long firstNanos;

    private ShortBusyWait(Ticker ticker) {
        this.ticker = ticker;
    }

    /** Makes {@code conn} wait this way instead of with SQLite's busy timeout. */
    static void install(Connection conn, Ticker ticker) throws SQLException {
        BusyHandler.setHandler(conn, new ShortBusyWait(ticker));
    }

    @Override
    protected int callback(int triesBefore) {
        long now = ticker.nanos();
        if (triesBefore == 0) {
            firstNanos = now;
        } else if (now - firstNanos >= LIMIT.toNanos()) {
            return 0;
        }
        LockSupport.parkNanos(Math.min(MAX_NAP_NANOS, FIRST_NAP_NANOS << Math.min(triesBefore, 10)));
        return 1;
    }
}
