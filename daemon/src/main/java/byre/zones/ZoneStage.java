package byre.zones;

import byre.config.ZoneConfig;
import byre.ingest.Reading;
import byre.rules.ZoneReading;
import byre.units.Quantity;
import java.time.Instant;
import java.util.Arrays;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.function.Consumer;

/**
 * Combines each zone's sensors into zone-level streams: the measured quantities as they arrive and,
 * whenever an input changes, every derived quantity whose inputs are fresh (no older than the zone's
 * max-age relative to the newest input). A measured quantity always wins over the same one derived.
 * Pure: no I/O, time comes from the readings.
 */
public final class ZoneStage {
    private static final int N = Quantity.values().length;
    /**
     * A zone is derived at most once per this interval of reading time: a sensor gone chatty (or a
     * session backlog) must not multiply the derivation work; barn climate changes over minutes. A
     * skipped derivation is done by {@link #derivePending} on the next tick.
     */
    public static final long MIN_DERIVE_INTERVAL_MS = 1000;

    /** Counts what the stage noticed, for the metrics. */
    public interface Observer {
        /** Notices nothing: for replay, which reports neither flags nor skips. */
        Observer NONE = new Observer() {
            @Override public void wetBulbAboveDryBulb(String zone, double excessC) {}
            @Override public void derivationSkipped(String zone, String why) {}
            @Override public void derived(String zone) {}
        };

        void wetBulbAboveDryBulb(String zone, double excessC);

        void derivationSkipped(String zone, String why);

        void derived(String zone);

        /** A reading kept out of live evaluation (see {@link #accept(Reading, Instant, Consumer)}); it is stored all the same. */
        default void notLive(String zone, String sensorId, String why) {}
    }

    private static final class ZoneState {
        final ZoneConfig config;
        final double[] values = new double[N];
        final long[] atMillis = new long[N];
        final double[] fresh = new double[N];
        final double[] derived = new double[N];
        long lastDerivedMs = Long.MIN_VALUE / 4; // far in the past, without overflow in the differences below
        Instant pendingAt;

        ZoneState(ZoneConfig config) {
            this.config = config;
            Arrays.fill(values, Double.NaN);
        }
    }

    // Replaced, never changed, when a zone is added (a central byre's found site): readers need no lock.
    private volatile Map<String, ZoneState> bySensor = Map.of();
    private volatile Map<String, ZoneState> byZone = Map.of();
    private final ZoneDeriver deriver;
    private final Observer observer;
    /** When {@link #derivePending} next has work (epoch ms on the caller's clock), or Long.MAX_VALUE: kept as derivations are put off. */
    private long pendingDueMs = Long.MAX_VALUE;

    public ZoneStage(List<ZoneConfig> zones, ZoneDeriver deriver, Observer observer) {
        this.deriver = deriver;
        this.observer = observer;
        add(zones);
    }

    /** Takes in zones that came after the start (a site a central byre found); those it has already stay as they are. */
    public synchronized void add(java.util.Collection<ZoneConfig> zones) {
        Map<String, ZoneState> zs = new HashMap<>(byZone);
        Map<String, ZoneState> ss = new HashMap<>(bySensor);
        for (ZoneConfig z : zones) {
            if (zs.containsKey(z.id())) continue;
            ZoneState s = new ZoneState(z);
            zs.put(z.id(), s);
            for (String sensor : z.sensors()) ss.put(sensor, s);
        }
        byZone = zs;
        bySensor = ss;
    }

    /** The zone a sensor belongs to, or null. */
    public String zoneOf(String sensorId) {
        ZoneState s = bySensor.get(sensorId);
        return s == null ? null : s.config.id();
    }

    /** Feeds one sensor reading, time taken from the readings alone (replay); emits the zone streams it produces. */
    public void accept(Reading r, Consumer<ZoneReading> out) {
        accept(r, null, out);
    }

    /**
     * Feeds one sensor reading as of {@code now} (live; null in replay); emits the zone streams it produces.
     * A reading that is not news (see {@link #notLiveBecause}) changes nothing and emits nothing.
     */
    public void accept(Reading r, Instant now, Consumer<ZoneReading> out) {
        ZoneState z = bySensor.get(r.sensorId());
        if (z == null) return;
        int q = r.quantity().ordinal();
        long t = r.at().toEpochMilli();
        String notLive = notLiveBecause(z, q, t, now);
        if (notLive != null) {
            observer.notLive(z.config.id(), r.sensorId(), notLive);
            return;
        }
        z.values[q] = r.value();
        z.atMillis[q] = t;
        out.accept(new ZoneReading(r.at(), z.config.id(), r.quantity(), r.value()));
        // Long.MIN_VALUE = never derived (t - MIN_VALUE would overflow and put off the first derivation for ever).
        if (t >= z.lastDerivedMs && t - z.lastDerivedMs < MIN_DERIVE_INTERVAL_MS) {
            z.pendingAt = r.at();
            if (now != null) pendingDueMs = Math.min(pendingDueMs, dueMs(z, now.toEpochMilli()));
            return;
        }
        derive(z, r.at(), out);
    }

    /**
     * Why a reading must not drive live evaluation, or null when it may. It is not news when it is no newer than
     * the zone's current input of its quantity (a redelivery, a duplicate, a sensor's buffer replayed out of
     * order), or, live, older than the zone's max-age before {@code now} (a buffer flushed after an outage, a clock
     * far behind, a retained last value): fed to the watches it would count as the present. The history keeps it
     * either way, and a replay, which reads the history in time order, sees it in its place.
     */
    /** The reason given for a reading at the very time of the current input: a redelivery, normal after a reconnect. */
    public static final String REPEAT = "at the same time as the current input (a repeat)";

    private static String notLiveBecause(ZoneState z, int q, long t, Instant now) {
        if (!Double.isNaN(z.values[q]) && t <= z.atMillis[q]) {
            return t == z.atMillis[q] ? REPEAT : "older than the current input";
        }
        if (now != null && now.toEpochMilli() - t > z.config.maxAge().toMillis()) return "older than the max-age before now";
        return null;
    }

    /** Derives the zones whose derivation was put off and is now due (the interval has passed by {@code now}). */
    public void derivePending(Instant now, Consumer<ZoneReading> out) {
        long n = now.toEpochMilli();
        long next = Long.MAX_VALUE;
        for (ZoneState z : byZone.values()) {
            if (z.pendingAt == null) continue;
            if (dueMs(z, n) <= n) derive(z, z.pendingAt, out);
            else next = Math.min(next, dueMs(z, n));
        }
        pendingDueMs = next;
    }

    /**
     * When {@link #derivePending} next has work (live): the earliest time a derivation put off by
     * {@link #accept(Reading, Instant, Consumer)} is due, or null when none waits. It may come early (a zone derived
     * meanwhile on a reading of its own), never late.
     */
    public Instant nextPending() {
        return pendingDueMs == Long.MAX_VALUE ? null : Instant.ofEpochMilli(pendingDueMs);
    }

    /** When a zone's put-off derivation is due: an interval after its last one, or at once when the clock is behind that. */
    private static long dueMs(ZoneState z, long nowMs) {
        return nowMs < z.lastDerivedMs ? nowMs : z.lastDerivedMs + MIN_DERIVE_INTERVAL_MS;
    }

    private void derive(ZoneState z, Instant at, Consumer<ZoneReading> out) {
        long t = at.toEpochMilli();
        z.lastDerivedMs = t;
        z.pendingAt = null;
        // Fresh = no older than max-age before the zone's newest input (sensors need not report in step).
        long newest = t;
        for (int i = 0; i < N; i++) newest = Math.max(newest, z.atMillis[i]);
        long oldest = newest - z.config.maxAge().toMillis();
        for (int i = 0; i < N; i++) {
            z.fresh[i] = z.atMillis[i] >= oldest ? z.values[i] : Double.NaN;
        }
        double dry = z.fresh[Quantity.DRY_BULB.ordinal()];
        double wet = z.fresh[Quantity.WET_BULB.ordinal()];
        double[] inputs = z.fresh;
        if (wet - dry > byre.climate.ZoneClimate.WET_ABOVE_DRY_TOLERANCE_C) {
            observer.wetBulbAboveDryBulb(z.config.id(), wet - dry);
            // Flagged here once and left out of the derivation, which would otherwise report the same fault again.
            inputs = z.fresh.clone();
            inputs[Quantity.WET_BULB.ordinal()] = Double.NaN;
        }

        String problem = deriver.derive(z.config, inputs, z.derived);
        if (problem != null) observer.derivationSkipped(z.config.id(), problem);
        boolean any = false;
        for (Quantity dq : Quantity.values()) {
            int i = dq.ordinal();
            double v = z.derived[i];
            if (Double.isNaN(v) || !Double.isNaN(z.fresh[i])) continue;
            any = true;
            out.accept(new ZoneReading(at, z.config.id(), dq, v));
        }
        if (any) observer.derived(z.config.id());
    }

    /** The latest value per quantity (measured, NaN if never seen) of a zone, for status lines. */
    public double latest(String zone, Quantity q) {
        ZoneState z = byZone.get(zone);
        return z == null ? Double.NaN : z.values[q.ordinal()];
    }

    public Instant latestAt(String zone, Quantity q) {
        ZoneState z = byZone.get(zone);
        return z == null || z.atMillis[q.ordinal()] == 0 ? null : Instant.ofEpochMilli(z.atMillis[q.ordinal()]);
    }
}
