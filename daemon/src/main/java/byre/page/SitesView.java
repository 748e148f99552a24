package byre.page;

import byre.alerts.OpenIncident;
import java.util.List;

/**
 * A central byre's list of sites, gathered first so that drawing it is a pure function of this and the time.
 * {@code problem} says what could not be read (null when all was).
 */
record SitesView(List<Site> sites, String problem) {
    /**
     * One site: its link, its open alerts (its own, as its events told the centre, and the centre's own alerts in
     * its zones), and the newest key values of each of its zones.
     */
    record Site(String id, BarnView.SiteState state, List<OpenIncident> alerts, List<BarnView.Zone> zones) {}
}
