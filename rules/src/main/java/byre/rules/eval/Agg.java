package byre.rules.eval;

/**
 * A statistic over a trailing window (now - w, now], kept incrementally: each reading is pushed once
 * and evicted once, so the cost per reading does not depend on the window length.
 */
interface Agg {
    void push(long t, double v);

    /** NaN when the window holds too little data to say. */
    double value(long now);
}
