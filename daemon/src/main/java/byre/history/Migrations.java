package byre.history;

import java.util.List;

/**
 * The schema of the history database, as a list of numbered steps. To change the schema, append a step
 * with the next number; never edit a step that has shipped. The file's {@code PRAGMA user_version} holds
 * the number of the last step applied.
 */
final class Migrations {
    private Migrations() {}

    /** Marks the file as ours ("byre" in ASCII), so a stranger SQLite file is refused with a clear message. */
    static final int APPLICATION_ID = 0x62797265;

    static final List<Migration> ALL = List.of(
        new Migration(1, "streams, raw readings, minute and hour rollups, state", List.of(
            // A stream is a sensor (key = sensor id) or a zone quantity (key = "zone.quantity").
            // The small integer id keeps the per-reading rows short.
            """
            CREATE TABLE stream (
              id   INTEGER PRIMARY KEY,
              kind TEXT    NOT NULL CHECK (kind IN ('sensor', 'zone')),
              key  TEXT    NOT NULL,
              UNIQUE (kind, key))""",
            // WITHOUT ROWID: the (stream, ts) key is the table itself, no second index (about 25 bytes a row).
            // ts is epoch milliseconds UTC.
            """
            CREATE TABLE reading (
              stream INTEGER NOT NULL,
              ts     INTEGER NOT NULL,
              value  REAL    NOT NULL,
              PRIMARY KEY (stream, ts)) WITHOUT ROWID""",
            // Rollups: ts = bucket start (epoch ms, aligned to the epoch), n = count, lo/hi = min/max,
            // total = sum (mean = total / n). Sums rather than means, so buckets merge exactly.
            """
            CREATE TABLE rollup_minute (
              stream INTEGER NOT NULL,
              ts     INTEGER NOT NULL,
              n      INTEGER NOT NULL,
              lo     REAL    NOT NULL,
              hi     REAL    NOT NULL,
              total  REAL    NOT NULL,
              PRIMARY KEY (stream, ts)) WITHOUT ROWID""",
            """
            CREATE TABLE rollup_hour (
              stream INTEGER NOT NULL,
              ts     INTEGER NOT NULL,
              n      INTEGER NOT NULL,
              lo     REAL    NOT NULL,
              hi     REAL    NOT NULL,
              total  REAL    NOT NULL,
              PRIMARY KEY (stream, ts)) WITHOUT ROWID""",
            // Small durable key/value store for other stages (watch state); updated = epoch ms.
            """
            CREATE TABLE state (
              key     TEXT    PRIMARY KEY,
              value   TEXT    NOT NULL,
              updated INTEGER NOT NULL)""",
            "PRAGMA application_id = " + APPLICATION_ID)),
        new Migration(2, "alert outbox: events and their delivery per channel", List.of(
            // Every alert event is committed here before the first delivery attempt. seq orders events
            // (delivery per channel follows it); id is the event's own id, body its JSON; times are epoch ms.
            """
            CREATE TABLE outbox_event (
              seq      INTEGER PRIMARY KEY AUTOINCREMENT,
              id       TEXT    NOT NULL UNIQUE,
              incident TEXT,
              kind     TEXT    NOT NULL,
              body     TEXT    NOT NULL,
              created  INTEGER NOT NULL)""",
            // One row per (channel, event). state: pending -> delivered | given-up | folded (sent inside a
            // rate-limit summary). next_at = earliest next attempt; reason/last_error = the last failure.
            """
            CREATE TABLE outbox_delivery (
              channel    TEXT    NOT NULL,
              event      INTEGER NOT NULL REFERENCES outbox_event(seq),
              state      TEXT    NOT NULL CHECK (state IN ('pending', 'delivered', 'given-up', 'folded')),
              attempts   INTEGER NOT NULL DEFAULT 0,
              next_at    INTEGER NOT NULL,
              reason     TEXT,
              last_error TEXT,
              done_at    INTEGER,
              PRIMARY KEY (channel, event)) WITHOUT ROWID""",
            "CREATE INDEX outbox_delivery_state ON outbox_delivery (state, channel, event)",
            "CREATE INDEX outbox_delivery_done ON outbox_delivery (channel, done_at)")),
        new Migration(3, "rollup marks: rollups are written when their bucket closes", List.of(
            // The minute (hour) table holds exactly the raw rows older than the minute (hour) mark; newer rows are
            // summed in memory until their bucket closes, and summed from the raw rows when read (epoch ms, aligned).
            """
            CREATE TABLE rollup_mark (
              res  TEXT    PRIMARY KEY CHECK (res IN ('minute', 'hour')),
              upto INTEGER NOT NULL) WITHOUT ROWID""",
            // Earlier versions wrote every row's rollups at once: everything stored so far is rolled up, so both marks
            // start at the end of the newest hour bucket (0 for a new file); rows of that hour still go into both tables
            // at once. One stream at a time: the key bounds each scan.
            """
            INSERT INTO rollup_mark(res, upto)
              SELECT 'minute', coalesce(max((SELECT max(ts) FROM rollup_hour h WHERE h.stream = s.id)) + 3600000, 0) FROM stream s""",
            "INSERT INTO rollup_mark(res, upto) SELECT 'hour', upto FROM rollup_mark WHERE res = 'minute'")),
        new Migration(4, "central: alert events received from sites", List.of(
            // A central byre's record of its sites' events, in arrival order (seq); id is the event's own id (a site
            // may deliver one twice), body its JSON, received epoch ms. IF NOT EXISTS: a central file of an earlier
            // build created the table itself.
            """
            CREATE TABLE IF NOT EXISTS site_event (
              seq      INTEGER PRIMARY KEY AUTOINCREMENT,
              id       TEXT    NOT NULL UNIQUE,
              site     TEXT    NOT NULL,
              incident TEXT,
              kind     TEXT    NOT NULL,
              body     TEXT    NOT NULL,
              received INTEGER NOT NULL)""",
            "CREATE INDEX IF NOT EXISTS site_event_incident ON site_event (incident)",
            "CREATE INDEX IF NOT EXISTS site_event_received ON site_event (received)")),
        new Migration(5, "packed runs of raw readings", List.of(
            // Raw readings older than the minute mark, packed (RunCodec) a few hundred to a row: a row per reading
            // costs about 25 bytes, a packed reading 2 to 4. ts = the run's first time, upto its last (epoch ms); runs
            // of a stream never overlap. `reading` keeps the newest rows, a row each, until they are sealed into runs
            // (RunSealer); rows already in `reading` are packed a step at a time by the writer after this upgrade.
            """
            CREATE TABLE reading_run (
              stream INTEGER NOT NULL,
              ts     INTEGER NOT NULL,
              upto   INTEGER NOT NULL,
              n      INTEGER NOT NULL,
              data   BLOB    NOT NULL,
              PRIMARY KEY (stream, ts)) WITHOUT ROWID"""))
    );

    static int latestVersion() { return ALL.get(ALL.size() - 1).version(); }
}
