package byre.rules.eval;

import byre.rules.TimeWindow;
import byre.rules.Watch;

/** The state machine of one (watch, zone). Times are engine-internal milliseconds. */
final class Instance {
    static final long NONE = Long.MIN_VALUE;

    final Watch watch;
    final String zone;
    final long raiseHold;
    final long clearHold;
    final TimeWindow only;
    Nodes.Test raise;
    Nodes.Test clear;
    Nodes.Num probe;
    Stream[] silentStreams = new Stream[0];
    /** The stream of a raise condition that is {@code silent(term)}: its last reading is the alert's {@code since}. */
    Stream silenceOf;

    AlertState state = AlertState.CLEAR;
    long since = NONE;
    long holdStart = NONE;
    long raisedAt = NONE;
    double value = Double.NaN;
    long due = NONE;
    long dueStamp;
    /** Took over the state of the same, unchanged watch across a reload. */
    boolean carried;

    Instance(Watch watch, String zone) {
        this.watch = watch;
        this.zone = zone;
        this.raiseHold = watch.raiseHold().toMillis();
        this.clearHold = watch.clearHold().toMillis();
        this.only = watch.onlyBetween().orElse(null);
    }

    /** The state of the same instance before a reload (same watch definition): hold timers run on. */
    void takeOver(Instance before) {
        state = before.state;
        since = before.since;
        holdStart = before.holdStart;
        raisedAt = before.raisedAt;
        value = before.value;
        carried = true;
    }

    String key() { return watch.name() + "/" + zone; }
}
