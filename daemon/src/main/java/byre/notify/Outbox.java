package byre.notify;

import byre.alerts.AlertEvent;
import byre.alerts.EventKind;
import byre.history.WriteTurn;
import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.sql.Statement;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.Optional;

/**
 * The durable outbox (tables {@code outbox_event}, {@code outbox_delivery} of the history file). An event is
 * committed, with one pending delivery row per channel, before anything tries to send it; the dispatcher then
 * moves each row to delivered, given-up or folded. All methods are thread-safe; times are passed in.
 */
public final class Outbox implements AutoCloseable {
    /** One pending delivery: the event's position, its JSON and how it has fared so far. */
    public record Row(String channel, long seq, String eventId, String kind, String body, Instant created, int attempts,
                      Instant nextAt, String lastError) {}

    private final Connection conn;
    /** Null when it could not be installed. */
    private final ShortBusyWait busyWait;

    /** Uses (and closes) {@code conn}, a connection to a history file migrated to version 2 or later. */
    public Outbox(Connection conn) {
        this(conn, null);
    }

    /**
     * As {@link #Outbox(Connection)}; an event's commit that has to wait for the file's write lock stands in
     * {@code turn}, the history writer's ({@link byre.history.HistoryStore#writeTurn()}), which then lets it go first.
     */
    public Outbox(Connection conn, WriteTurn turn) {
        this(conn, byre.time.Ticker.SYSTEM, turn);
    }

    /** {@code ticker} times how long a statement has waited for the file's write lock ({@link ShortBusyWait}). */
    Outbox(Connection conn, byre.time.Ticker ticker, WriteTurn turn) {
        this.conn = conn;
        ShortBusyWait w = null;
        try {
            w = ShortBusyWait.install(conn, ticker, turn);
        } catch (SQLException e) {
            // The connection keeps the busy timeout it was opened with: slower to notice a released lock, no less safe.
        }
        this.busyWait = w;
        try (Statement st = conn.createStatement()) {
            // Whichever connection commits past the write-ahead log's limit copies the whole log into the file (4000
            // pages) before its commit returns; an alert's commit must not be that one. The history writer checkpoints
            // instead (after its own commits past the limit, and after an idle retention interval).
            st.execute("PRAGMA wal_autocheckpoint = 0");
        } catch (SQLException e) {
            // The connection then checkpoints now and then itself: slower for that one alert, no less safe.
        }
    }

    /**
     * Commits events and their deliveries in one transaction. A reminder is not queued on a channel that still
     * holds an undelivered reminder of the same incident: a channel that is down does not pile them up.
     *
     * @return the number of delivery rows created
     */
    public int enqueue(List<AlertEvent> events, Instant now) throws SQLException {
        return enqueue(events, now, null, null);
    }

    /**
     * As {@link #enqueue(List, Instant)}, and stores {@code stateValue} under {@code stateKey} (unless that is null) in
     * the file's state table in the same transaction: the incident state and the events it caused reach the disk with
     * one fsync (tens of milliseconds on an SD card, before the first delivery attempt of every alert), and a crash
     * keeps both or neither.
     */
    public int enqueue(List<AlertEvent> events, Instant now, String stateKey, String stateValue) throws SQLException {
        synchronized (conn) {
            if (busyWait != null) busyWait.urgent();
            try {
                return inTransaction(() -> {
                    if (stateKey != null) byre.history.HistoryStore.writeState(conn, stateKey, stateValue, now.toEpochMilli());
                    return insertEvents(events, now);
                });
            } finally {
                if (busyWait != null) busyWait.done();
            }
        }
    }

    /** Runs {@code work} in one transaction on the outbox connection (the caller holds its lock). */
    private <T> T inTransaction(SqlWork<T> work) throws SQLException {
        boolean auto = conn.getAutoCommit();
        conn.setAutoCommit(false);
        try {
            T result = work.run();
            conn.commit();
            return result;
        } catch (SQLException | RuntimeException ex) {
            conn.rollback();
            throw ex;
        } finally {
            conn.setAutoCommit(auto);
        }
    }

    @FunctionalInterface
    private interface SqlWork<T> {
        T run() throws SQLException;
    }

    /** Inserts events and their deliveries inside the caller's transaction; returns the delivery rows created. */
    private int insertEvents(List<AlertEvent> events, Instant now) throws SQLException {
        int rows = 0;
        try (PreparedStatement ev = conn.prepareStatement(
                "INSERT OR IGNORE INTO outbox_event(id, incident, kind, body, created) VALUES (?, ?, ?, ?, ?)");
             PreparedStatement seqOf = conn.prepareStatement("SELECT seq FROM outbox_event WHERE id = ?");
             PreparedStatement del = conn.prepareStatement(
                     "INSERT OR IGNORE INTO outbox_delivery(channel, event, state, attempts, next_at) VALUES (?, ?, 'pending', 0, ?)");
             PreparedStatement drop = conn.prepareStatement("DELETE FROM outbox_event WHERE seq = ? AND NOT EXISTS "
                     + "(SELECT 1 FROM outbox_delivery WHERE event = ?)");
             PreparedStatement pendingReminder = conn.prepareStatement(
                     "SELECT 1 FROM outbox_delivery d JOIN outbox_event e ON e.seq = d.event "
                     + "WHERE d.channel = ? AND d.state = 'pending' AND e.kind = 'reminder' AND e.incident = ? LIMIT 1")) {
            for (AlertEvent e : events) {
                if (e.channels().isEmpty()) continue;
                ev.setString(1, e.id());
                ev.setString(2, e.incident());
                ev.setString(3, e.kind().id());
                ev.setString(4, e.toJson());
                ev.setLong(5, now.toEpochMilli());
                ev.executeUpdate();
                seqOf.setString(1, e.id());
                long seq;
                try (ResultSet rs = seqOf.executeQuery()) {
                    rs.next();
                    seq = rs.getLong(1);
                }
                for (String ch : e.channels()) {
                    if (e.kind() == EventKind.REMINDER && e.incident() != null) {
                        pendingReminder.setString(1, ch);
                        pendingReminder.setString(2, e.incident());
                        try (ResultSet rs = pendingReminder.executeQuery()) {
                            if (rs.next()) continue;
                        }
                    }
                    del.setString(1, ch);
                    del.setLong(2, seq);
                    del.setLong(3, now.toEpochMilli());
                    rows += del.executeUpdate();
                }
                drop.setLong(1, seq); // every channel already holds a reminder of it: keep no orphan event
                drop.setLong(2, seq);
                drop.executeUpdate();
            }
        }
        return rows;
    }

    /** Channels with at least one pending delivery. */
    public List<String> channelsWithPending() throws SQLException {
        List<String> out = new ArrayList<>();
        synchronized (conn) {
            try (Statement st = conn.createStatement();
                 ResultSet rs = st.executeQuery("SELECT DISTINCT channel FROM outbox_delivery WHERE state = 'pending' ORDER BY channel")) {
                while (rs.next()) out.add(rs.getString(1));
            }
        }
        return out;
    }

    /** The oldest pending deliveries of a channel, in event order (the first is the one to send next). */
    public List<Row> pending(String channel, int limit) throws SQLException {
        List<Row> out = new ArrayList<>();
        synchronized (conn) {
            try (PreparedStatement ps = conn.prepareStatement(
                    "SELECT d.event, e.id, e.kind, e.body, e.created, d.attempts, d.next_at, d.last_error "
                    + "FROM outbox_delivery d JOIN outbox_event e ON e.seq = d.event "
                    + "WHERE d.channel = ? AND d.state = 'pending' ORDER BY d.event LIMIT ?")) {
                ps.setString(1, channel);
                ps.setInt(2, limit);
                try (ResultSet rs = ps.executeQuery()) {
                    while (rs.next()) {
                        out.add(new Row(channel, rs.getLong(1), rs.getString(2), rs.getString(3), rs.getString(4),
                                Instant.ofEpochMilli(rs.getLong(5)), rs.getInt(6), Instant.ofEpochMilli(rs.getLong(7)), rs.getString(8)));
                    }
                }
            }
        }
        return out;
    }

    public Optional<Row> head(String channel) throws SQLException {
        List<Row> l = pending(channel, 1);
        return l.isEmpty() ? Optional.empty() : Optional.of(l.get(0));
    }

    public void delivered(Row r, Instant now) throws SQLException {
        finish(r, "delivered", now, null);
    }

    public void givenUp(Row r, Instant now, String why) throws SQLException {
        finish(r, "given-up", now, why);
    }

    private void finish(Row r, String state, Instant now, String error) throws SQLException {
        synchronized (conn) {
            // Only the enqueue must survive a power cut; a "delivered" mark lost with the last second before
            // one means the event goes out once more (at-least-once, receivers drop duplicates by id). So this
            // update skips the fsync, which costs tens of milliseconds per message on an SD card.
            try (java.sql.Statement st = conn.createStatement()) {
                st.execute("PRAGMA synchronous=NORMAL");
            }
            try (PreparedStatement ps = conn.prepareStatement(
                    "UPDATE outbox_delivery SET state = ?, done_at = ?, last_error = coalesce(?, last_error) WHERE channel = ? AND event = ?")) {
                ps.setString(1, state);
                ps.setLong(2, now.toEpochMilli());
                ps.setString(3, error);
                ps.setString(4, r.channel());
                ps.setLong(5, r.seq());
                ps.executeUpdate();
            } finally {
                try (java.sql.Statement st = conn.createStatement()) {
                    st.execute("PRAGMA synchronous=FULL");
                }
            }
        }
    }

    /**
     * Makes every waiting delivery due now: after a restart byre tries at once rather than waiting out a
     * backoff that was chosen before it went down. Returns how many rows were brought forward.
     */
    public int retryNow(Instant now) throws SQLException {
        synchronized (conn) {
            try (PreparedStatement ps = conn.prepareStatement(
                    "UPDATE outbox_delivery SET next_at = ? WHERE state = 'pending' AND next_at > ?")) {
                ps.setLong(1, now.toEpochMilli());
                ps.setLong(2, now.toEpochMilli());
                return ps.executeUpdate();
            }
        }
    }

    public void failed(Row r, Instant nextAt, FailureReason reason, String error) throws SQLException {
        synchronized (conn) {
            try (PreparedStatement ps = conn.prepareStatement(
                    "UPDATE outbox_delivery SET attempts = attempts + 1, next_at = ?, reason = ?, last_error = ? WHERE channel = ? AND event = ?")) {
                ps.setLong(1, nextAt.toEpochMilli());
                ps.setString(2, reason.tag());
                ps.setString(3, error);
                ps.setString(4, r.channel());
                ps.setLong(5, r.seq());
                ps.executeUpdate();
            }
        }
    }

    /**
     * Marks {@code rows} as folded and queues {@code summary} for the channel, in one transaction: a crash
     * can never leave events folded away without the summary that stands for them.
     */
    public void fold(String channel, List<Row> rows, AlertEvent summary, Instant now) throws SQLException {
        synchronized (conn) {
            inTransaction(() -> {
                try (PreparedStatement ps = conn.prepareStatement(
                        "UPDATE outbox_delivery SET state = 'folded', done_at = ? WHERE channel = ? AND event = ?")) {
                    for (Row r : rows) {
                        ps.setLong(1, now.toEpochMilli());
                        ps.setString(2, channel);
                        ps.setLong(3, r.seq());
                        ps.executeUpdate();
                    }
                }
                return insertEvents(List.of(summary.to(List.of(channel))), now);
            });
        }
    }

    /** How many messages a channel was sent in a window, and when the oldest of them went (null when none). */
    public record Sent(int count, Instant oldest) {}

    /**
     * Messages delivered on a channel at or after {@code from} (a summary counts once), for the rate limit. Counted
     * by SQLite: the dispatcher asks before every attempt, and listing a busy channel's window was the largest
     * allocation on the way of an alert.
     */
    public Sent sentSince(String channel, Instant from) throws SQLException {
        synchronized (conn) {
            try (PreparedStatement ps = conn.prepareStatement(
                    "SELECT count(*), min(done_at) FROM outbox_delivery WHERE channel = ? AND state = 'delivered' AND done_at >= ?")) {
                ps.setString(1, channel);
                ps.setLong(2, from.toEpochMilli());
                try (ResultSet rs = ps.executeQuery()) {
                    rs.next();
                    int n = rs.getInt(1);
                    return new Sent(n, n == 0 ? null : Instant.ofEpochMilli(rs.getLong(2)));
                }
            }
        }
    }

    /** Pending deliveries over all channels. */
    public long depth() throws SQLException {
        return number("SELECT count(*) FROM outbox_delivery WHERE state = 'pending'");
    }

    /** When the oldest undelivered event was committed, if any. */
    public Optional<Instant> oldestPending() throws SQLException {
        long ms = number("SELECT coalesce(min(e.created), -1) FROM outbox_delivery d JOIN outbox_event e ON e.seq = d.event WHERE d.state = 'pending'");
        return ms < 0 ? Optional.empty() : Optional.of(Instant.ofEpochMilli(ms));
    }

    /** Deletes finished deliveries older than {@code before} and events left with no delivery. */
    public int prune(Instant before) throws SQLException {
        synchronized (conn) {
            try (PreparedStatement ps = conn.prepareStatement("DELETE FROM outbox_delivery WHERE state <> 'pending' AND done_at < ?");
                 Statement st = conn.createStatement()) {
                ps.setLong(1, before.toEpochMilli());
                int n = ps.executeUpdate();
                st.executeUpdate("DELETE FROM outbox_event WHERE seq NOT IN (SELECT event FROM outbox_delivery)");
                return n;
            }
        }
    }

    private long number(String sql) throws SQLException {
        synchronized (conn) {
            try (Statement st = conn.createStatement(); ResultSet rs = st.executeQuery(sql)) {
                return rs.next() ? rs.getLong(1) : 0;
            }
        }
    }

    @Override
    public void close() {
        synchronized (conn) {
            try {
                conn.close();
            } catch (SQLException ignored) {
                // closing is best effort
            }
        }
    }
}
