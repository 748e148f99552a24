package byre.rules.eval;

import byre.rules.RuleSet;
import byre.rules.Watch;
import byre.rules.ZoneReading;
import byre.units.Quantity;
import byre.units.Unit;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneId;
import java.time.format.DateTimeFormatter;
import java.time.zone.ZoneRules;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.PriorityQueue;

/**
 * Runs the watches of a rule set: one state machine per (watch, zone), fed with zone readings and
 * told the time. It reads no clock: time comes only from {@link #accept} and {@link #tick}, so a replay
 * of history gives the events the live daemon gave. Not thread-safe: call it from one thread.
 *
 * <p>Hold timers complete at their exact due time, whatever the tick rate: {@code tick} and
 * {@code accept} first run every timer due at or before the given time, in time order.
 *
 * <p>Clock jumps: with {@link Options#maxClockStep()} set (live), a step of the clock forward or
 * backward larger than that bound is taken as the clock being corrected, not as time passing: the
 * engine's own time stands still across it, so hold timers and silence neither fire nor reset, and
 * times reported afterwards are in the new clock. Without it (replay), gaps are real elapsed time.
 * Small backward steps never move the engine's time back; such readings count at the engine's time.
 */
public final class WatchEngine {
    private static final long NONE = Long.MIN_VALUE;
    private static final DateTimeFormatter SINCE = DateTimeFormatter.ofPattern("yyyy-MM-dd HH:mm", Locale.ROOT);

    /**
     * @param maxClockStep a larger step between two calls is a clock jump (null: no jump detection, for replay)
     * @param usUnits      show values in messages in F and mph instead of C and m/s
     */
    public record Options(Duration maxClockStep, boolean usUnits) {
        /** Replay: every gap is real time. */
        public static Options replay() { return new Options(null, false); }

        /** Live (told the time at least every minute): a step over 10 minutes is a clock jump. */
        public static Options live() { return new Options(Duration.ofMinutes(10), false); }
    }

    private record Due(long at, Instance inst, long stamp) {}

    private final RuleSet rules;
    private final ZoneId siteZone;
    private final ZoneRules zoneRules;
    private final long maxStep;
    private final boolean usUnits;
    private final Map<String, Stream[]> streams = new HashMap<>();
    private final List<Instance> instances = new ArrayList<>();
    private final Map<String, Instance> byKey = new LinkedHashMap<>();
    private final PriorityQueue<Due> due = new PriorityQueue<>((a, b) -> a.at != b.at ? Long.compare(a.at, b.at) : Long.compare(a.stamp, b.stamp));
    private final ArrayList<Transition> out = new ArrayList<>();
    private long stamp;
    private long now = NONE;
    private long start = NONE;
    private long offset;
    private long clockJumps;
    private long dropped;
    private WatchEngine previous;

    public WatchEngine(RuleSet rules, ZoneId siteZone) {
        this(rules, siteZone, Options.replay());
    }

    public WatchEngine(RuleSet rules, ZoneId siteZone, Options options) {
        this(rules, siteZone, options, null);
    }

    /**
     * An engine for reloaded rules that takes over from {@code previous}: its time, every stream's latest
     * reading and the windows whose function and length are unchanged, and the whole state (hold timers
     * included) of every instance whose watch is defined exactly as before. Other instances start clear;
     * {@link #restore} gives them their saved state. Call it on the thread that ran {@code previous},
     * which must not be used afterwards.
     */
    public WatchEngine(RuleSet rules, ZoneId siteZone, Options options, WatchEngine previous) {
        this.rules = rules;
        this.siteZone = siteZone;
        this.zoneRules = siteZone.getRules();
        this.maxStep = options.maxClockStep() == null ? 0 : Math.max(1, options.maxClockStep().toMillis());
        this.usUnits = options.usUnits();
        this.previous = previous;
        if (previous != null) {
            now = previous.now;
            start = previous.start;
            offset = previous.offset;
            clockJumps = previous.clockJumps;
            dropped = previous.dropped;
        }
        for (Watch w : rules.watches()) {
            for (String z : w.zones()) {
                Instance inst = new Instance(w, z);
                Nodes nodes = new Nodes(z, this::stream, inst, () -> start);
                inst.raise = nodes.bind(w.raiseCondition());
                inst.clear = w.clearCondition() == null ? null : nodes.bind(w.clearCondition());
                inst.probe = nodes.firstValue != null ? nodes.firstValue : t -> Double.NaN;
                inst.silentStreams = nodes.silent.toArray(new Stream[0]);
                if (w.raiseCondition() instanceof Plan.Silent q) {
                    inst.silenceOf = stream(q.term().zone() != null ? q.term().zone() : z, q.term().quantity());
                }
                Instance before = previous == null ? null : previous.byKey.get(inst.key());
                if (before != null && before.watch.sameDefinition(w)) inst.takeOver(before);
                instances.add(inst);
                byKey.put(inst.key(), inst);
            }
        }
        this.previous = null; // only the construction reads it
        if (now != NONE) for (Instance inst : instances) schedule(inst, now); // carried holds and silences keep their due times
    }

    private Stream stream(String zone, Quantity q) {
        Stream[] row = streams.computeIfAbsent(zone, z -> new Stream[Quantity.values().length]);
        Stream s = row[q.ordinal()];
        if (s == null) {
            s = new Stream(zone, q, rules.maxAge(zone).toMillis());
            Stream[] before = previous == null ? null : previous.streams.get(zone);
            if (before != null && before[q.ordinal()] != null) s.carryFrom(before[q.ordinal()]);
            row[q.ordinal()] = s;
        }
        return s;
    }

    public RuleSet rules() { return rules; }

    /** One reading (canonical unit). Returns the transitions it and any timers due up to its time caused. */
    public List<Transition> accept(ZoneReading r) {
        if (r == null || r.at() == null || r.quantity() == null || !Double.isFinite(r.value())) {
            dropped++;
            return List.of();
        }
        advance(r.at().toEpochMilli(), false);
        Stream[] row = streams.get(r.zone());
        Stream s = row == null ? null : row[r.quantity().ordinal()];
        if (s != null) {
            s.push(now, r.value());
            for (Instance inst : s.dependents) evaluate(inst, now);
        }
        return drain();
    }

    /** Tells the engine the time: runs hold timers and silence checks due by then. */
    public List<Transition> tick(Instant t) {
        if (t != null) advance(t.toEpochMilli(), true);
        return drain();
    }

    /**
     * When the next hold timer or silence check is due, in the caller's clock (what {@link #tick} is given), or null
     * when none is set: a live caller need not tick before then (but see {@link Options#maxClockStep()}).
     */
    public Instant nextDue() {
        while (!due.isEmpty()) {
            Due d = due.peek();
            if (d.inst.dueStamp == d.stamp && d.inst.due == d.at) return Instant.ofEpochMilli(d.at + offset);
            due.poll(); // superseded by a later schedule of its instance
        }
        return null;
    }

    /**
     * Feeds a reading into the windows and latest values only, without evaluating any watch: for rebuilding
     * window contents from history after a restart, before the first {@link #accept}. Readings must come in time order.
     */
    public void prime(ZoneReading r) {
        if (r == null || r.at() == null || r.quantity() == null || !Double.isFinite(r.value())) return;
        Stream[] row = streams.get(r.zone());
        Stream s = row == null ? null : row[r.quantity().ordinal()];
        if (s != null) s.prime(r.at().toEpochMilli() - offset, r.value());
    }

    private List<Transition> drain() {
        if (out.isEmpty()) return List.of();
        List<Transition> l = List.copyOf(out);
        out.clear();
        return l;
    }

    private void advance(long ext, boolean authoritative) {
        long t = ext - offset;
        if (now == NONE) {
            now = t;
            start = t;
            for (Instance inst : instances) if (inst.silentStreams.length > 0) schedule(inst, now);
            return;
        }
        long step = t - now;
        if (maxStep > 0 && (step > maxStep || (authoritative && -step > maxStep))) {
            offset += step; // the clock was corrected: our time stands still across the jump
            clockJumps++;
            return;
        }
        if (step <= 0) return;
        while (!due.isEmpty() && due.peek().at <= t) {
            Due d = due.poll();
            if (d.inst.dueStamp != d.stamp || d.inst.due != d.at) continue;
            d.inst.due = NONE;
            now = d.at;
            evaluate(d.inst, d.at);
        }
        now = t;
    }

    private boolean inWindow(Instance inst, long t) {
        if (inst.only == null) return true;
        long ext = t + offset;
        int off = zoneRules.getOffset(Instant.ofEpochMilli(ext)).getTotalSeconds();
        long local = Math.floorDiv(ext, 1000) + off;
        return inst.only.contains((int) (Math.floorMod(local, 86_400L) / 60));
    }

    private void evaluate(Instance inst, long t) {
        int r = inst.raise.test(t);
        switch (inst.state) {
            case CLEAR:
                if (r == Nodes.T && inWindow(inst, t)) {
                    inst.state = AlertState.HOLDING;
                    inst.since = inst.silenceOf != null ? inst.silenceOf.quietSince(start) : t;
                    inst.holdStart = t;
                    if (inst.raiseHold == 0) raise(inst, t);
                }
                break;
            case HOLDING:
                if (r != Nodes.T || !inWindow(inst, t)) {
                    inst.state = AlertState.CLEAR;
                    inst.since = NONE;
                    inst.holdStart = NONE;
                } else {
                    if (inst.holdStart == NONE) inst.holdStart = t; // restored: the hold restarts
                    if (t - inst.holdStart >= inst.raiseHold) raise(inst, t);
                }
                break;
            case RAISED:
                if (clearTest(inst, r, t) == Nodes.T) {
                    inst.state = AlertState.CLEARING;
                    inst.holdStart = t;
                    if (inst.clearHold == 0) clear(inst, t);
                }
                break;
            default: // CLEARING
                if (clearTest(inst, r, t) != Nodes.T) {
                    inst.state = AlertState.RAISED; // silently back: the alert never ended
                    inst.holdStart = NONE;
                } else {
                    if (inst.holdStart == NONE) inst.holdStart = t;
                    if (t - inst.holdStart >= inst.clearHold) clear(inst, t);
                }
                break;
        }
        schedule(inst, t);
    }

    /** Without a clear line the watch clears when the raise condition is false (unknown is not false). */
    private static int clearTest(Instance inst, int raise, long t) {
        if (inst.clear != null) return inst.clear.test(t);
        return raise == Nodes.F ? Nodes.T : raise == Nodes.T ? Nodes.F : Nodes.U;
    }

    private void schedule(Instance inst, long t) {
        long next = NONE;
        if (inst.state == AlertState.HOLDING && inst.holdStart != NONE) next = inst.holdStart + inst.raiseHold;
        else if (inst.state == AlertState.CLEARING && inst.holdStart != NONE) next = inst.holdStart + inst.clearHold;
        for (Stream s : inst.silentStreams) {
            if (!s.silent(t, start)) {
                long at = s.silentAt(start);
                if (next == NONE || at < next) next = at;
            }
        }
        if (next != NONE && next <= t) next = NONE;
        if (next == inst.due) return;
        inst.due = next;
        if (next != NONE) {
            inst.dueStamp = ++stamp;
            due.add(new Due(next, inst, inst.dueStamp));
        }
    }

    private void raise(Instance inst, long t) {
        inst.state = AlertState.RAISED;
        inst.holdStart = NONE;
        inst.raisedAt = t;
        inst.value = inst.probe.value(t);
        out.add(transition(Transition.Kind.RAISED, inst, t));
    }

    private void clear(Instance inst, long t) {
        inst.value = inst.probe.value(t);
        out.add(transition(Transition.Kind.CLEARED, inst, t));
        inst.state = AlertState.CLEAR;
        inst.since = NONE;
        inst.holdStart = NONE;
        inst.raisedAt = NONE;
    }

    private Transition transition(Transition.Kind kind, Instance inst, long t) {
        Watch w = inst.watch;
        Quantity q = w.quantity();
        Instant since = Instant.ofEpochMilli(inst.since + offset);
        Instant at = Instant.ofEpochMilli(t + offset);
        // A raise carries the watch's own message (its advice); an all-clear carries only its own 'clear message',
        // never the raise's advice. Empty text: the alert stage says what happened in its own words.
        String template = kind == Transition.Kind.RAISED ? (w.hasOwnMessage() ? w.messageTemplate() : null)
                : w.clearMessageTemplate().orElse(null);
        String msg = template == null ? ""
                : MessageText.render(template, w, inst.zone, displayUnit(q), inst.value, rules.site(), since.atZone(siteZone).format(SINCE));
        return new Transition(kind, w.name(), inst.zone, w.level(), q.id(), inst.value, q.canonicalUnit().symbol(), since, at, msg);
    }

    private Unit displayUnit(Quantity q) {
        return MessageText.displayUnit(q, usUnits);
    }

    // ---- persistence without I/O ----

    /**
     * The state of every instance that is not clear, keyed {@code watch/zone}; the value reads like
     * {@code RAISED since=2026-07-14T13:05:00Z raised=2026-07-14T13:35:00Z value=73.4}. Window contents
     * and latest values are not included: rebuild them with {@link #prime} from history.
     */
    public Map<String, String> snapshot() {
        Map<String, String> m = new LinkedHashMap<>();
        for (Instance inst : instances) {
            if (inst.state == AlertState.CLEAR) continue;
            StringBuilder sb = new StringBuilder(inst.state.name());
            if (inst.since != NONE) sb.append(" since=").append(Instant.ofEpochMilli(inst.since + offset));
            if (inst.raisedAt != NONE) sb.append(" raised=").append(Instant.ofEpochMilli(inst.raisedAt + offset));
            if (!Double.isNaN(inst.value)) sb.append(" value=").append(inst.value);
            m.put(inst.key(), sb.toString());
        }
        return m;
    }

    /**
     * Restores a {@link #snapshot} before the first reading. A raised alert stays raised without a new
     * {@code raised} event; a holding raise or a running clear keeps its state but its hold restarts at
     * the first evaluation (the time in between was not observed). Entries for watches or zones no
     * longer in the rules are skipped; the returned list says which and why (empty when all applied).
     */
    public List<String> restore(Map<String, String> snapshot) {
        List<String> problems = new ArrayList<>();
        if (snapshot == null) return problems;
        for (Map.Entry<String, String> e : snapshot.entrySet()) {
            Instance inst = byKey.get(e.getKey());
            if (inst != null && inst.carried) continue; // took over its exact state from the engine before the reload
            if (inst == null) {
                problems.add(e.getKey() + ": no such watch instance in the current rules; skipped");
                continue;
            }
            try {
                String[] parts = e.getValue().trim().split("\\s+");
                AlertState st = AlertState.fromSaved(parts[0]);
                long since = NONE;
                long raised = NONE;
                double value = Double.NaN;
                for (int i = 1; i < parts.length; i++) {
                    String p = parts[i];
                    if (p.startsWith("since=")) since = Instant.parse(p.substring(6)).toEpochMilli() - offset;
                    else if (p.startsWith("raised=")) raised = Instant.parse(p.substring(7)).toEpochMilli() - offset;
                    else if (p.startsWith("value=")) value = Double.parseDouble(p.substring(6));
                }
                if (st != AlertState.CLEAR && since == NONE) throw new IllegalArgumentException("no since=");
                inst.state = st;
                inst.since = st == AlertState.CLEAR ? NONE : since;
                inst.raisedAt = st == AlertState.RAISED || st == AlertState.CLEARING ? (raised == NONE ? since : raised) : NONE;
                inst.value = value;
                inst.holdStart = NONE;
            } catch (RuntimeException ex) {
                problems.add(e.getKey() + ": cannot read '" + e.getValue() + "' (" + ex.getMessage() + "); skipped");
            }
        }
        return problems;
    }

    /** How many instances took over their state, hold timers included, from the engine before a reload. */
    public int carriedInstances() {
        int n = 0;
        for (Instance inst : instances) if (inst.carried) n++;
        return n;
    }

    /** All (watch, zone) instances. */
    public int instanceCount() { return instances.size(); }

    /** Every instance that is not clear. */
    public List<InstanceState> openInstances() {
        List<InstanceState> l = new ArrayList<>();
        for (Instance inst : instances) {
            if (inst.state == AlertState.CLEAR) continue;
            l.add(new InstanceState(inst.watch.name(), inst.zone, inst.state, Instant.ofEpochMilli(inst.since + offset),
                    inst.raisedAt == NONE ? null : Instant.ofEpochMilli(inst.raisedAt + offset), inst.value));
        }
        return l;
    }

    /** State of one instance ({@code CLEAR} for unknown keys). */
    public AlertState state(String watch, String zone) {
        Instance inst = byKey.get(watch + "/" + zone);
        return inst == null ? AlertState.CLEAR : inst.state;
    }

    /** How many clock jumps were absorbed (live mode). */
    public long clockJumps() { return clockJumps; }

    /** Readings refused for a missing time or a non-finite value. */
    public long droppedReadings() { return dropped; }
}
