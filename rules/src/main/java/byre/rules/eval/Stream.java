package byre.rules.eval;

import byre.units.Quantity;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/** The live state of one (zone, quantity) stream: its latest reading, its constant run, its windows. */
public final class Stream {
    static final long NONE = Long.MIN_VALUE;

    final String zone;
    final Quantity quantity;
    final long maxAgeMs;
    double last = Double.NaN;
    long lastAt = NONE;
    long runStart = NONE;
    private Agg[] aggs = new Agg[0];
    private final Map<String, Agg> byKey = new HashMap<>();
    Instance[] dependents = new Instance[0];
    /** The same stream of the engine before a reload: its latest reading and windows carry over. */
    private Stream carriedFrom;
    /** Windows new with this engine, which {@link #prime} fills from history (carried ones are already full). */
    private Agg[] toPrime = new Agg[0];

    Stream(String zone, Quantity quantity, long maxAgeMs) {
        this.zone = zone;
        this.quantity = quantity;
        this.maxAgeMs = maxAgeMs;
    }

    /** A reading; times never go backwards here (the engine clamps them). */
    void push(long t, double v) {
        if (lastAt != NONE && t < lastAt) t = lastAt;
        if (lastAt == NONE || Double.compare(v, last) != 0) runStart = t;
        last = v;
        lastAt = t;
        for (Agg a : aggs) a.push(t, v);
    }

    /** Takes over the latest reading and constant run of the same stream before a reload; its windows are reused by key. */
    void carryFrom(Stream old) {
        carriedFrom = old;
        last = old.last;
        lastAt = old.lastAt;
        runStart = old.runStart;
    }

    /** A reading from history, before the first live one: fills only what did not carry over a reload. */
    void prime(long t, double v) {
        if (carriedFrom == null) {
            push(t, v);
            return;
        }
        for (Agg a : toPrime) a.push(t, v);
    }

    /** A reading exactly max-age old is still fresh: a sensor reporting every max-age never looks stale. */
    boolean fresh(long now) { return lastAt != NONE && now - lastAt <= maxAgeMs; }

    double latest(long now) { return fresh(now) ? last : Double.NaN; }

    /**
     * Silent from the moment the newest reading is max-age old (the instant at which it is still fresh,
     * so timers land on whole times); before the first reading, counted from the engine's start.
     */
    boolean silent(long now, long engineStart) {
        long ref = lastAt != NONE ? lastAt : engineStart;
        return now - ref >= maxAgeMs;
    }

    long silentAt(long engineStart) { return (lastAt != NONE ? lastAt : engineStart) + maxAgeMs; }

    /** Time of the newest reading, or the engine's start before the first: what a silence is "since". */
    long quietSince(long engineStart) { return lastAt != NONE ? lastAt : engineStart; }

    /** Unknown (-1) without a fresh reading, else 1 when the value has not changed for the window. */
    int stuck(long now, long windowMs) {
        if (!fresh(now)) return -1;
        return now - runStart >= windowMs ? 1 : 0;
    }

    Agg agg(String key, java.util.function.Supplier<Agg> make) {
        Agg a = byKey.get(key);
        if (a == null) {
            a = carriedFrom == null ? null : carriedFrom.byKey.get(key); // same key: same function over the same window
            if (a == null) {
                a = make.get();
                toPrime = append(toPrime, a);
            }
            byKey.put(key, a);
            aggs = append(aggs, a);
        }
        return a;
    }

    private static Agg[] append(Agg[] to, Agg a) {
        List<Agg> l = new ArrayList<>(List.of(to));
        l.add(a);
        return l.toArray(new Agg[0]);
    }

    void addDependent(Instance i) {
        for (Instance d : dependents) if (d == i) return;
        Instance[] n = java.util.Arrays.copyOf(dependents, dependents.length + 1);
        n[dependents.length] = i;
        dependents = n;
    }
}
