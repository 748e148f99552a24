package byre.central;

import byre.config.CentralSettings;
import byre.zones.ZoneDeriver;
import java.util.function.Supplier;

/**
 * The derivation of a byre with a {@code central:} section: a site's zone takes the site's streams as they are (the
 * barn derived them from its own sensors and settings; deriving again here could disagree), and derives nothing;
 * any other zone derives as usual. The daemon and {@code byre replay} both use it, so they agree.
 */
public final class CentralDeriver {
    private CentralDeriver() {}

    public static ZoneDeriver wrap(CentralSettings central, ZoneDeriver deriver) {
        return wrap(() -> central, deriver);
    }

    /** As {@link #wrap(CentralSettings, ZoneDeriver)}, with the sites as now known (a running daemon finds more). */
    public static ZoneDeriver wrap(Supplier<CentralSettings> central, ZoneDeriver deriver) {
        if (!central.get().enabled()) return deriver;
        return (zone, inputs, out) -> central.get().isMirroredZone(zone.id()) || central.get().isSiteZone(zone.id())
                ? ZoneDeriver.NONE.derive(zone, inputs, out) : deriver.derive(zone, inputs, out);
    }
}
