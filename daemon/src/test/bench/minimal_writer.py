#!/usr/bin/env python3
"""The minimal writer of the wear benchmark: the least a program can do to keep every reading in SQLite.

Reads `mosquitto_sub -v` lines ("topic payload") from standard input, keeps the payload's "v" and "ts",
and inserts them into one WITHOUT ROWID table keyed (stream, ts), in WAL mode with synchronous=NORMAL,
committing every COMMIT_EVERY seconds. Usage: minimal_writer.py DB COMMIT_EVERY_S [SEED_ROWS TOPICS_FILE].
With SEED_ROWS it first fills the table with that many rows spread over the past 14 days (one
transaction) under the topics listed in TOPICS_FILE, one a line: the topics the load will publish, so that
each stream's rows already fill pages of their own, as after weeks of running (seeded under other names, the
new rows of every stream would share a few fresh pages and each commit would write far fewer pages than in a
barn). Prints its counts as one line of JSON at the end of input
or on SIGTERM.
"""
import json
import signal
import sqlite3
import sys
import time

db, every = sys.argv[1], float(sys.argv[2])
conn = sqlite3.connect(db, isolation_level=None)
conn.execute("PRAGMA journal_mode=WAL")
conn.execute("PRAGMA synchronous=NORMAL")
conn.execute("CREATE TABLE IF NOT EXISTS reading (stream TEXT NOT NULL, ts INTEGER NOT NULL, value REAL NOT NULL,"
             " PRIMARY KEY (stream, ts)) WITHOUT ROWID")
if len(sys.argv) > 4:
    rows = int(sys.argv[3])
    with open(sys.argv[4]) as f:
        topics = [t.strip() for t in f if t.strip()]
    streams = len(topics)
    now = int(time.time() * 1000)
    step = 14 * 86_400_000 * streams // max(rows, 1)
    conn.execute("BEGIN")
    conn.executemany("INSERT OR IGNORE INTO reading VALUES (?, ?, ?)",
                     ((topics[i % streams], now - 14 * 86_400_000 + (i // streams) * step, 15.0 + (i % 97) / 10)
                      for i in range(rows)))
    conn.execute("COMMIT")
    conn.execute("PRAGMA wal_checkpoint(TRUNCATE)")
    print(json.dumps({"seeded": rows}), flush=True)
    sys.exit(0)

stats = {"readings": 0, "commits": 0}
pending = []
last = time.monotonic()


def commit():
    global pending, last
    if pending:
        conn.execute("BEGIN")
        conn.executemany("INSERT OR IGNORE INTO reading VALUES (?, ?, ?)", pending)
        conn.execute("COMMIT")
        stats["commits"] += 1
        stats["readings"] += len(pending)
        pending = []
    last = time.monotonic()


def finish(*_):
    commit()
    print(json.dumps(stats), flush=True)
    sys.exit(0)


signal.signal(signal.SIGTERM, finish)
for line in sys.stdin:
    topic, _, payload = line.rstrip("\n").partition(" ")
    try:
        p = json.loads(payload)
        pending.append((topic, int(p["ts"]), float(p["v"])))
    except (ValueError, KeyError, TypeError):
        continue
    if time.monotonic() - last >= every:
        commit()
finish()
