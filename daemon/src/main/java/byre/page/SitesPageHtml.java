package byre.page;

import static byre.page.Html.esc;

import byre.alerts.OpenIncident;
import byre.units.Quantity;
import byre.units.Unit;
import java.time.Instant;
import java.util.Comparator;
import java.util.List;

/**
 * Draws a central byre's list of sites, worst first: each site's link (online or offline, how long since its last
 * message), its worst open alert, and the newest THI (with its band) and air temperature of each zone, the site's name
 * leading to its own page. The barn page's style sheet, colours and parts; a pure function of what was gathered and
 * the time.
 */
final class SitesPageHtml {
    private SitesPageHtml() {}

    /** The worst of a site's open alerts: the most severe, unacknowledged before acknowledged, then the longest open. */
    static final Comparator<OpenIncident> WORST = Comparator
            .comparingInt((OpenIncident a) -> -BarnPageHtml.severity(a.level()))
            .thenComparing(a -> a.ackBy() != null)
            .thenComparing(a -> a.since() == null ? a.raisedAt() : a.since(), Comparator.nullsLast(Comparator.naturalOrder()));

    /**
     * Worst sites first: by their worst open alert (critical, warning, info; unacknowledged before acknowledged; any
     * alert before none), then offline before not yet known before online, then by name.
     */
    static final Comparator<SitesView.Site> WORST_FIRST = Comparator
            .comparingInt((SitesView.Site s) -> -alertRank(s))
            .thenComparingInt(SitesPageHtml::linkRank)
            .thenComparing(SitesView.Site::id);

    private static int alertRank(SitesView.Site s) {
        OpenIncident w = worst(s);
        return w == null ? -1 : 2 * BarnPageHtml.severity(w.level()) + (w.ackBy() == null ? 1 : 0);
    }

    private static int linkRank(SitesView.Site s) {
        Boolean online = s.state().online();
        return Boolean.FALSE.equals(online) ? 0 : online == null ? 1 : 2;
    }

    static OpenIncident worst(SitesView.Site s) {
        return s.alerts().stream().min(WORST).orElse(null);
    }

    static String page(BarnPageHtml.Site centre, SitesView v, Instant now) {
        StringBuilder sb = new StringBuilder(8192 + 1024 * v.sites().size());
        BarnPageHtml.head(sb, centre, now, centre.name() + ": all sites", true);
        BarnPageHtml.header(sb, centre, now);
        if (v.problem() != null) sb.append("<p class=\"card\"><strong>").append(esc(v.problem())).append("</strong></p>\n");
        List<SitesView.Site> sites = v.sites().stream().sorted(WORST_FIRST).toList();
        long alerting = sites.stream().filter(s -> !s.alerts().isEmpty()).count();
        long offline = sites.stream().filter(s -> Boolean.FALSE.equals(s.state().online())).count();
        sb.append("<section id=\"sites\"><h2>").append(sites.isEmpty() ? "No sites yet" : "Sites (" + sites.size() + ")");
        if (alerting > 0) sb.append(" &middot; ").append(alerting).append(" with open alerts");
        if (offline > 0) sb.append(" &middot; ").append(offline).append(" offline");
        sb.append("</h2>\n");
        if (sites.isEmpty()) {
            sb.append("<p class=\"card\">No site has reported yet. A site listed under <code>central.sites</code>, or one found on the "
                    + "broker when <code>central.discover</code> is on, shows here.</p>\n");
        }
        for (SitesView.Site s : sites) site(sb, centre, s, now);
        sb.append("</section>\n");
        BarnPageHtml.footer(sb, centre);
        return sb.toString();
    }

    private static void site(StringBuilder sb, BarnPageHtml.Site centre, SitesView.Site s, Instant now) {
        OpenIncident w = worst(s);
        sb.append("<article class=\"card site");
        if (w != null) sb.append(" alert lvl-").append(esc(BarnPageHtml.levelWord(w)));
        sb.append("\" data-site=\"").append(esc(s.id())).append("\">");
        sb.append("<h2><a href=\"/site/").append(esc(s.id())).append("\">").append(esc(s.id())).append("</a><span class=\"sub\">");
        BarnPageHtml.linkState(sb, s.state(), now);
        sb.append("</span></h2>");
        if (w == null) {
            sb.append("<p class=\"meta\">No open alerts</p>");
        } else {
            BarnPageHtml.what(sb, w, within(s.id(), w.zone()));
            sb.append("<p class=\"meta\">open ").append(esc(BarnPageHtml.openFor(w, now))).append(" &middot; ")
                    .append(w.ackBy() == null ? "<span class=\"unacked\">not acknowledged</span>" : "acknowledged by " + esc(w.ackBy()));
            if (w.fromAlertState()) sb.append(" &middot; <span class=\"known\">").append(esc(OpenIncident.FROM_ALERT_STATE)).append("</span>");
            if (s.alerts().size() > 1) sb.append(" &middot; ").append(s.alerts().size()).append(" open alerts");
            sb.append("</p>");
        }
        sb.append("<ul class=\"keys\">");
        for (BarnView.Zone z : s.zones()) keyValues(sb, centre, s.id(), z, now);
        sb.append("</ul></article>\n");
    }

    /** One zone's line: its name within the site, THI with its band, and the air temperature; stale ones dimmed. */
    private static void keyValues(StringBuilder sb, BarnPageHtml.Site centre, String site, BarnView.Zone z, Instant now) {
        sb.append("<li data-zone=\"").append(esc(z.id())).append("\"><span class=\"zn\">").append(esc(within(site, z.id()))).append("</span>");
        BarnView.Value thi = z.values().get(Quantity.THI);
        BarnView.Value dry = z.values().get(Quantity.DRY_BULB);
        if (thi == null && dry == null) sb.append("<span class=\"sub\">no readings yet</span>");
        if (thi != null) {
            sb.append("<span data-q=\"thi\"").append(staleness(thi, z, now)).append(">THI <span class=\"kv\">").append(BarnPageHtml.fmt(thi.value(), 1))
                    .append("</span> ").append(BarnPageHtml.bandChip(thi.value())).append("</span>");
        }
        if (dry != null) {
            Unit u = BarnPageHtml.displayUnit(Quantity.DRY_BULB, centre.us());
            sb.append("<span data-q=\"dry-bulb\"").append(staleness(dry, z, now)).append(">").append(esc(BarnPageHtml.label(Quantity.DRY_BULB)))
                    .append(" <span class=\"kv\">").append(BarnPageHtml.number(u.fromCanonical(dry.value()), Quantity.DRY_BULB, u))
                    .append(BarnPageHtml.unitSuffix(u)).append("</span></span>");
        }
        sb.append("</li>");
    }

    private static String staleness(BarnView.Value v, BarnView.Zone z, Instant now) {
        return BarnPageHtml.stale(v, z, now) ? " class=\"stale\" title=\"" + esc(BarnPageHtml.ago(v, now)) + "\"" : "";
    }

    /** A central zone as named within its site ({@code cow-shed} for {@code larkmoor/cow-shed}); none for the site's own zone. */
    static String within(String site, String zone) {
        if (zone == null || zone.equals(site)) return "";
        return zone.startsWith(site + "/") ? zone.substring(site.length() + 1) : zone;
    }
}
