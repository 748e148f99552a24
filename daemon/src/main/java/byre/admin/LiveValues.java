package byre.admin;

import byre.daemon.Pipeline;
import byre.rules.ZoneReading;
import byre.units.Quantity;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.atomic.AtomicReferenceArray;

/** Keeps the newest value of every zone stream as it passes the pipeline, for {@code GET /status}. */
public final class LiveValues implements Pipeline.ZoneListener {
    private static final int QUANTITIES = Quantity.values().length;
    /** Per zone, the newest reading per quantity (by ordinal): written by the pipeline thread, read by the API. */
    private final Map<String, AtomicReferenceArray<ZoneReading>> latest = new ConcurrentHashMap<>();

    @Override
    public void accept(ZoneReading r) {
        AtomicReferenceArray<ZoneReading> zone = latest.get(r.zone());
        if (zone == null) zone = latest.computeIfAbsent(r.zone(), z -> new AtomicReferenceArray<>(QUANTITIES));
        int q = r.quantity().ordinal();
        ZoneReading old = zone.get(q);
        if (old == null || !r.at().isBefore(old.at())) zone.set(q, r);
    }

    /** Every stream's newest reading, by zone then quantity order. */
    public List<ZoneReading> snapshot() {
        List<ZoneReading> out = new ArrayList<>();
        for (AtomicReferenceArray<ZoneReading> zone : latest.values()) {
            for (int q = 0; q < QUANTITIES; q++) {
                ZoneReading r = zone.get(q);
                if (r != null) out.add(r);
            }
        }
        out.sort(Comparator.comparing(ZoneReading::zone).thenComparing(r -> r.quantity().ordinal()));
        return out;
    }

    /** The newest reading of one stream, or null. */
    public ZoneReading get(String zone, Quantity q) {
        AtomicReferenceArray<ZoneReading> z = latest.get(zone);
        return z == null ? null : z.get(q.ordinal());
    }
}
