package byre.notify;

import byre.history.WriteTurn;
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
    private final WriteTurn turn;
    private long firstNanos;
    private boolean urgent;
    private boolean inLine;

    private ShortBusyWait(Ticker ticker, WriteTurn turn) {
        this.ticker = ticker;
        this.turn = turn;
    }

    /**
     * Makes {@code conn} wait this way instead of with SQLite's busy timeout. While {@link #urgent()}, a wait also
     * stands in {@code turn} (null: nowhere), so that the history writer lets it go first.
     */
    static ShortBusyWait install(Connection conn, Ticker ticker, WriteTurn turn) throws SQLException {
        ShortBusyWait w = new ShortBusyWait(ticker, turn);
        BusyHandler.setHandler(conn, w);
        return w;
    }

    /** The statements until {@link #done()} are an alert's commit. */
    void urgent() {
        urgent = true;
    }

    /** The alert's commit has ended: leaves the writer's line if it stood in it. */
    void done() {
        if (inLine) turn.served();
        inLine = false;
        urgent = false;
    }

    @Override
    protected int callback(int triesBefore) {
        long now = ticker.nanos();
        if (triesBefore == 0) {
            firstNanos = now;
            if (urgent && !inLine && turn != null) {
                turn.waiting();
                inLine = true;
            }
        } else if (now - firstNanos >= LIMIT.toNanos()) {
            return 0;
        }
        LockSupport.parkNanos(Math.min(MAX_NAP_NANOS, FIRST_NAP_NANOS << Math.min(triesBefore, 10)));
        return 1;
    }
}
