package byre.page;

import byre.alerts.OpenIncident;
import java.time.Instant;
import java.util.List;
import java.util.Optional;
import java.util.function.Supplier;

/**
 * What the page listener serves: a barn's own page, or a central byre's list of sites and each site's page. The
 * listener itself (logins, signed links, acknowledging, headers) is the same for both.
 */
interface PageContent {
    /** What acknowledging one of this byre's own incidents does. */
    String OWN_ACK = "Reminders and escalation stop; the people already told are told who is on it.";

    /** The page at {@code /}. */
    String front(Instant now);

    /** The page of one site at {@code /site/<id>}; empty when there is no such site (a barn has none). */
    Optional<String> site(String id, Instant now);

    /** Every open incident the page may acknowledge. */
    List<OpenIncident> open();

    /** What follows an acknowledgement of {@code incident}, said on the page that confirms it. */
    String afterAck(String incident);

    /** Who an acknowledgement from the page is recorded as when the form gives no name. */
    String unnamed();

    /** A barn's page: its zones, alerts and silent sensors. */
    static PageContent barn(BarnPageHtml.Site site, BarnPageSource source, Supplier<List<OpenIncident>> open) {
        return new PageContent() {
            @Override
            public String front(Instant now) {
                return BarnPageHtml.page(site, source.gather(now), now);
            }

            @Override
            public Optional<String> site(String id, Instant now) {
                return Optional.empty();
            }

            @Override
            public List<OpenIncident> open() {
                return open.get();
            }

            @Override
            public String afterAck(String incident) {
                return OWN_ACK;
            }

            @Override
            public String unnamed() {
                return "barn page";
            }
        };
    }

    /**
     * A central byre's pages: the list of sites, and each site's page drawn as a barn's (under the site's name, with
     * the way back to the list). An acknowledgement of a site's incident is sent to that site.
     */
    static PageContent central(BarnPageHtml.Site centre, CentralPageSource source) {
        return new PageContent() {
            @Override
            public String front(Instant now) {
                return SitesPageHtml.page(centre, source.list(now), now);
            }

            @Override
            public Optional<String> site(String id, Instant now) {
                return source.site(id, now).map(v -> BarnPageHtml.page(new BarnPageHtml.Site(id, centre.timezone(), centre.us()), v, now));
            }

            @Override
            public List<OpenIncident> open() {
                return source.open();
            }

            @Override
            public String afterAck(String incident) {
                String site = source.siteOf(incident);
                return site == null ? OWN_ACK : "Sent to " + site + ": its byre records who acknowledged, stops its reminders and escalation, and reports back; "
                        + "the site's page then shows it.";
            }

            @Override
            public String unnamed() {
                return centre.name() + " page";
            }
        };
    }
}
