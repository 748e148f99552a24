package byre.admin;

import byre.daemon.Pipeline;
import byre.rules.ZoneReading;
import byre.units.Quantity;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;

/** Keeps the newest value of every zone stream as it passes the pipeline, for {@code GET /status}. */
public final class LiveValues implements Pipeline.ZoneListener {
    private final Map<String, ZoneReading> latest = new ConcurrentHashMap<>();

    @Override
    public void accept(ZoneReading r) {
        latest.merge(r.zone() + "\u0000" + r.quantity().id(), r, (old, neu) -> neu.at().isBefore(old.at()) ? old : neu);
    }

    /** Every stream's newest reading, by zone then quantity order. */
    public List<ZoneReading> snapshot() {
        List<ZoneReading> out = new ArrayList<>(latest.values());
        out.sort(Comparator.comparing(ZoneReading::zone).thenComparing(r -> r.quantity().ordinal()));
        return out;
    }

    /** The newest reading of one stream, or null. */
    public ZoneReading get(String zone, Quantity q) {
        return latest.get(zone + "\u0000" + q.id());
    }
}
