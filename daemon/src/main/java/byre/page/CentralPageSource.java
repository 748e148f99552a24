package byre.page;

import byre.alerts.OpenIncident;
import byre.central.CentralConsumer;
import byre.config.ByreConfig;
import byre.config.CentralSettings;
import byre.config.ZoneConfig;
import byre.history.HistoryException;
import byre.history.HistoryReader;
import byre.units.Quantity;
import java.time.Instant;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.function.Function;
import java.util.function.Supplier;

/**
 * Gathers a central byre's pages: the list of sites (each one's link, open alerts and newest key values) and the page
 * of one site (its zones as the barn page draws them, with its open alerts). A site's alerts are its own, as the
 * centre's view of its events holds them, and the centre's own alerts in its zones (such as "site offline"). The
 * central byre's own zones, if it has any, are listed as one more site under its own id.
 */
final class CentralPageSource {
    /** The values each zone shows in the list of sites. */
    static final List<Quantity> KEY_VALUES = List.of(Quantity.THI, Quantity.DRY_BULB);

    /** A site as the centre lists it: its id and its central zones ({@code <site>/<zone>}). */
    record Listed(String id, List<ZoneConfig> zones) {}

    private final String self;
    private final List<ZoneConfig> ownZones;
    private final BarnPageSource zones;
    private final Supplier<HistoryReader> readers;
    private final Supplier<List<Listed>> sites;
    private final Supplier<List<OpenIncident>> own;
    private final Supplier<List<OpenIncident>> ofSites;
    private final Function<String, BarnView.SiteState> links;

    /**
     * @param self     the central byre's own site id
     * @param ownZones its zones that are no site's
     * @param zones    reads zones' values and trends (the barn page's own reader)
     * @param readers  opens a read-only history connection (closed after each use)
     * @param sites    the sites now known, in the order of the configuration
     * @param own      the central byre's own open incidents
     * @param ofSites  the sites' open incidents, zones as {@code <site>/<zone>}
     * @param links    a site's link as known now: online, and when it was last heard from (its values' times are added)
     */
    CentralPageSource(String self, List<ZoneConfig> ownZones, BarnPageSource zones, Supplier<HistoryReader> readers,
                      Supplier<List<Listed>> sites, Supplier<List<OpenIncident>> own, Supplier<List<OpenIncident>> ofSites,
                      Function<String, BarnView.SiteState> links) {
        this.self = self;
        this.ownZones = List.copyOf(ownZones);
        this.zones = zones;
        this.readers = readers;
        this.sites = sites;
        this.own = own;
        this.ofSites = ofSites;
        this.links = links;
    }

    /**
     * The pages of a running central byre: its sites as {@code central} knows them, their events' open incidents and
     * links; {@code own} is the central byre's own open incidents, its own zones those of {@code config} that are no site's.
     */
    static CentralPageSource of(ByreConfig config, CentralConsumer central, BarnPageSource zones, Supplier<HistoryReader> readers,
                                Supplier<List<OpenIncident>> own) {
        CentralSettings c = config.central();
        List<ZoneConfig> ownZones = config.zones().values().stream().filter(z -> !c.isSiteZone(z.id()) && !c.isMirroredZone(z.id())).toList();
        return new CentralPageSource(config.site(), ownZones, zones, readers,
                () -> central.siteIds().stream().map(s -> new Listed(s, central.zones(s))).toList(),
                own, () -> central.events().openIncidents(), s -> {
                    Double online = central.links().online(s);
                    return BarnView.SiteState.of(online == null ? null : online == 1.0, central.links().lastHeard(s));
                });
    }

    /** Every site with its link, open alerts and the newest THI and air temperature of each zone; unsorted. */
    SitesView list(Instant now) {
        List<Listed> listed = sites.get();
        Map<String, List<OpenIncident>> alerts = alertsBySite(listed);
        List<SitesView.Site> out = new ArrayList<>();
        String problem = null;
        HistoryReader r = null;
        try {
            r = readers.get();
        } catch (HistoryException e) {
            problem = "the history cannot be read (values shown are those received since byre started): " + e.getMessage();
        }
        try {
            for (Listed s : listed) {
                List<BarnView.Zone> z = zones.newest(s.zones(), KEY_VALUES, r);
                out.add(new SitesView.Site(s.id(), state(s.id(), z), alerts.get(s.id()), z));
            }
            List<OpenIncident> mine = alerts.get(self);
            if (!ownZones.isEmpty() || !mine.isEmpty()) {
                out.add(new SitesView.Site(self, BarnView.SiteState.SELF, mine, zones.newest(ownZones, KEY_VALUES, r)));
            }
        } catch (HistoryException e) {
            problem = "the history cannot be read: " + e.getMessage();
        } finally {
            if (r != null) r.close();
        }
        return new SitesView(out, problem);
    }

    /** One site's page (the central byre's own under its own id), or empty when no such site is known. */
    Optional<BarnView> site(String id, Instant now) {
        List<Listed> listed = sites.get();
        Map<String, List<OpenIncident>> alerts = alertsBySite(listed);
        for (Listed s : listed) {
            if (!s.id().equals(id)) continue;
            BarnView v = zones.gather(s.zones(), alerts.get(id), now, BarnView.SiteState.of(null, null));
            return Optional.of(new BarnView(v.zones(), v.alerts(), v.silent(), v.problem(), state(id, v.zones())));
        }
        if (id.equals(self) && (!ownZones.isEmpty() || !alerts.get(self).isEmpty())) {
            return Optional.of(zones.gather(ownZones, alerts.get(self), now, BarnView.SiteState.SELF));
        }
        return Optional.empty();
    }

    /** Every open incident the page may acknowledge: the central byre's own and the sites'. */
    List<OpenIncident> open() {
        List<OpenIncident> out = new ArrayList<>(own.get());
        out.addAll(ofSites.get());
        return out;
    }

    /** The site whose own incident this is (an acknowledgement of it goes to that site), or null. */
    String siteOf(String incident) {
        for (OpenIncident i : ofSites.get()) {
            if (i.id().equals(incident)) return siteOfZone(i.zone());
        }
        return null;
    }

    /** Each site's open alerts (and the central byre's own ones in no site's zones under its own id), urgent first. */
    private Map<String, List<OpenIncident>> alertsBySite(List<Listed> listed) {
        Map<String, List<OpenIncident>> by = new LinkedHashMap<>();
        for (Listed s : listed) by.put(s.id(), new ArrayList<>());
        by.putIfAbsent(self, new ArrayList<>());
        for (OpenIncident i : open()) {
            String site = siteOfZone(i.zone());
            by.getOrDefault(site, by.get(self)).add(i);
        }
        by.replaceAll((k, v) -> v.stream().sorted(BarnPageHtml.URGENCY).toList());
        return by;
    }

    /** {@code larkmoor} for the zones {@code larkmoor} and {@code larkmoor/cow-shed}; null for no zone. */
    static String siteOfZone(String zone) {
        if (zone == null || zone.isEmpty()) return null;
        int slash = zone.indexOf('/');
        return slash < 0 ? zone : zone.substring(0, slash);
    }

    /** The site's link, heard from at least as recently as its newest value was measured. */
    private BarnView.SiteState state(String site, List<BarnView.Zone> zs) {
        BarnView.SiteState s = links.apply(site);
        Instant heard = s == null ? null : s.lastHeard();
        for (BarnView.Zone z : zs) {
            for (BarnView.Value v : z.values().values()) {
                if (heard == null || v.at().isAfter(heard)) heard = v.at();
            }
        }
        return BarnView.SiteState.of(s == null ? null : s.online(), heard);
    }
}
