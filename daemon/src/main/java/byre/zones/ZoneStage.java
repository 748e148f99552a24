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
        void wetBulbAboveDryBulb(String zone, double excessC);

        void derivationSkipped(String zone, String why);

        void derived(String zone);
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

    private final Map<String, ZoneState> bySensor = new HashMap<>();
    private final Map<String, ZoneState> byZone = new HashMap<>();
    private final ZoneDeriver deriver;
    private final Observer observer;

    public ZoneStage(List<ZoneConfig> zones, ZoneDeriver deriver, Observer observer) {
        this.deriver = deriver;
        this.observer = observer;
        for (ZoneConfig z : zones) {
            ZoneState s = new ZoneState(z);
            byZone.put(z.id(), s);
            for (String sensor : z.sensors()) bySensor.put(sensor, s);
        }
    }

    /** The zone a sensor belongs to, or null. */
    public String zoneOf(String sensorId) {
        ZoneState s = bySensor.get(sensorId);
        return s == null ? null : s.config.id();
    }

    /** Feeds one sensor reading; emits the zone streams it produces. */
    public void accept(Reading r, Consumer<ZoneReading> out) {
        ZoneState z = bySensor.get(r.sensorId());
        if (z == null) return;
        int q = r.quantity().ordinal();
        long t = r.at().toEpochMilli();
        if (z.atMillis[q] > t && !Double.isNaN(z.values[q])) {
            // An older reading redelivered after a newer one: keep the newer as the current input.
            out.accept(new ZoneReading(r.at(), z.config.id(), r.quantity(), r.value()));
            return;
        }
        z.values[q] = r.value();
        z.atMillis[q] = t;
        out.accept(new ZoneReading(r.at(), z.config.id(), r.quantity(), r.value()));
        // Long.MIN_VALUE = never derived (t - MIN_VALUE would overflow and put off the first derivation for ever).
        if (t >= z.lastDerivedMs && t - z.lastDerivedMs < MIN_DERIVE_INTERVAL_MS) {
            z.pendingAt = r.at();
            return;
        }
        derive(z, r.at(), out);
    }

    /** Derives the zones whose derivation was put off and is now due (the interval has passed by {@code now}). */
    public void derivePending(Instant now, Consumer<ZoneReading> out) {
        long n = now.toEpochMilli();
        for (ZoneState z : byZone.values()) {
            if (z.pendingAt != null && (n - z.lastDerivedMs >= MIN_DERIVE_INTERVAL_MS || n < z.lastDerivedMs)) {
                derive(z, z.pendingAt, out);
            }
        }
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
