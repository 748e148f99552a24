package byre.page;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.alerts.OpenIncident;
import byre.units.Quantity;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.junit.jupiter.api.Test;

/** A central byre's list of sites, drawn from gathered data at a fixed time: order, links, alerts, values, escaping. */
class SitesPageHtmlTest {
    static final Instant DAY = BarnPageHtmlTest.DAY;
    static final BarnPageHtml.Site HUB = new BarnPageHtml.Site("hub", BarnPageHtmlTest.LONDON, false);

    static OpenIncident alert(String id, String watch, String zone, String level, long openMinutes, String ackBy) {
        Instant since = DAY.minus(Duration.ofMinutes(openMinutes));
        return new OpenIncident(id, watch, zone, level, "thi", 80.1, "", since, since, "", List.of(), false, ackBy,
                ackBy == null ? null : DAY.minusSeconds(60));
    }

    static SitesView.Site site(String id, Boolean online, long heardMinutesAgo, List<OpenIncident> alerts, BarnView.Zone... zones) {
        return new SitesView.Site(id, BarnView.SiteState.of(online, DAY.minus(Duration.ofMinutes(heardMinutesAgo))), alerts, List.of(zones));
    }

    static BarnView.Zone shed(String site) {
        return BarnPageHtmlTest.zone(site + "/cow-shed", DAY, Quantity.THI, 81.4, 1, Quantity.DRY_BULB, 30.0, 1);
    }

    /** The site ids in the order the page lists them. */
    static List<String> order(String html) {
        List<String> out = new ArrayList<>();
        Matcher m = Pattern.compile("<article class=\"[^\"]*\" data-site=\"([^\"]+)\"").matcher(html);
        while (m.find()) out.add(m.group(1));
        return out;
    }

    @Test
    void worstSitesComeFirst() {
        List<SitesView.Site> sites = List.of(
                site("ashby", true, 1, List.of()),
                site("brackenhill", true, 1, List.of(alert("w1", "dairy-heat", "brackenhill/cow-shed", "warning", 30, null))),
                site("coldharbour", false, 40, List.of()),
                site("dunmere", true, 1, List.of(alert("c1", "calf-cold", "dunmere/calf-pen-1", "critical", 5, "Sam"))),
                site("eastfold", true, 1, List.of(alert("c2", "calf-cold", "eastfold/calf-pen-1", "critical", 2, null),
                        alert("i1", "dusty", "eastfold/cow-shed", "info", 90, null))),
                site("fernley", null, 0, List.of()),
                site("larkmoor", true, 1, List.of(alert("i2", "dusty", "larkmoor/cow-shed", "info", 90, null))));
        String html = SitesPageHtml.page(HUB, new SitesView(sites, null), DAY);
        // Critical unacknowledged, critical acknowledged, warning, info; then without alerts: offline, no status yet, online.
        assertEquals(List.of("eastfold", "dunmere", "brackenhill", "larkmoor", "coldharbour", "fernley", "ashby"), order(html));
        assertTrue(html.contains("Sites (7) &middot; 4 with open alerts &middot; 1 offline"), html);
    }

    @Test
    void eachSiteShowsItsWorstAlertItsLinkAndItsKeyValues() {
        SitesView.Site eastfold = site("eastfold", true, 2, List.of(alert("i1", "dusty", "eastfold/cow-shed", "info", 90, null),
                alert("c2", "calf-cold", "eastfold/calf-pen-1", "critical", 42, null)), shed("eastfold"),
                BarnPageHtmlTest.zone("eastfold/calf-pen-1", DAY, Quantity.DRY_BULB, 3.0, 12));
        String html = SitesPageHtml.page(HUB, new SitesView(List.of(eastfold), null), DAY);
        String card = card(html, "eastfold");
        assertTrue(card.startsWith("<article class=\"card site alert lvl-critical\""), "coloured by its worst alert: " + card);
        assertTrue(card.contains("<a href=\"/site/eastfold\">eastfold</a>"), "the name leads to the site's page");
        assertTrue(card.contains("<span class=\"level\">critical</span>calf-cold in <span class=\"nb\">calf-pen-1</span>"),
                "the worst alert, its zone named within the site: " + card);
        assertTrue(card.contains("open 42 min &middot; <span class=\"unacked\">not acknowledged</span> &middot; 2 open alerts"), card);
        assertTrue(card.contains("data-state=\"online\">online</span> <span class=\"nb heard\">last message 2 min ago</span>"), card);
        assertTrue(card.contains("<li data-zone=\"eastfold/cow-shed\"><span class=\"zn\">cow-shed</span><span data-q=\"thi\">THI "
                + "<span class=\"kv\">81.4</span> <span class=\"band b2\">danger</span></span><span data-q=\"dry-bulb\">Air "
                + "<span class=\"kv\">30.0\u00a0°C</span></span></li>"), card);
        assertTrue(card.contains("<span data-q=\"dry-bulb\" class=\"stale\" title=\"12 min old\">"), "a stale value is dimmed: " + card);
        // In US units, as the rest of the page (30 C = 86 F, common practice).
        assertTrue(SitesPageHtml.page(new BarnPageHtml.Site("hub", BarnPageHtmlTest.LONDON, true), new SitesView(List.of(eastfold), null), DAY)
                .contains("<span class=\"kv\">86.0\u00a0°F</span>"));
    }

    @Test
    void anOfflineSiteIsShownAsSuchWithHowLongItHasBeenQuiet() {
        SitesView.Site quiet = site("coldharbour", false, 185, List.of(alert("d1", "site-down", "coldharbour", "critical", 170, null)),
                BarnPageHtmlTest.zone("coldharbour/cow-shed", DAY, Quantity.THI, 70.2, 185));
        SitesView.Site fresh = new SitesView.Site("fernley", BarnView.SiteState.of(null, null), List.of(), List.of());
        String html = SitesPageHtml.page(HUB, new SitesView(List.of(fresh, quiet), null), DAY);
        String card = card(html, "coldharbour");
        assertTrue(card.contains("<span class=\"state off\" data-state=\"offline\">offline</span> <span class=\"nb heard\">last message 3 h 5 min ago</span>"), card);
        assertTrue(card.contains("<span data-q=\"thi\" class=\"stale\" title=\"3 h 5 min old\">"), "its last values are stale: " + card);
        assertTrue(card.contains("<span class=\"level\">critical</span>site-down</p>"), "an alert of the site itself names no zone: " + card);
        String none = card(html, "fernley");
        assertTrue(none.contains("data-state=\"unknown\">no status yet</span> <span class=\"nb heard\">nothing heard yet</span>"), none);
        assertTrue(none.contains("<p class=\"meta\">No open alerts</p>"), none);
    }

    @Test
    void theCentresOwnZonesAreOneMoreSite() {
        SitesView.Site own = new SitesView.Site("hub", BarnView.SiteState.SELF, List.of(),
                List.of(BarnPageHtmlTest.zone("office", DAY, Quantity.DRY_BULB, 21.0, 0)));
        String html = SitesPageHtml.page(HUB, new SitesView(List.of(own), null), DAY);
        assertTrue(card(html, "hub").contains("<span class=\"state\">this byre</span>"), html);
        assertTrue(card(html, "hub").contains("<span class=\"zn\">office</span>"), html);
    }

    @Test
    void noSitesYetSaysWhereTheyComeFrom() {
        String html = SitesPageHtml.page(HUB, new SitesView(List.of(), null), DAY);
        assertTrue(html.contains("<h2>No sites yet</h2>"), html);
        assertTrue(html.contains("central.discover"));
    }

    @Test
    void everythingFromOutsideIsEscaped() {
        SitesView.Site evil = new SitesView.Site("x<b>", BarnView.SiteState.of(true, DAY),
                List.of(alert("a\"1", "heat<script>", "x<b>/shed&1", "critical", 1, "<i>Sam</i>")),
                List.of(BarnPageHtmlTest.zone("x<b>/shed&1", DAY, Quantity.THI, 70.0, 0)));
        String html = SitesPageHtml.page(HUB, new SitesView(List.of(evil), "the history cannot be read: <locked>"), DAY);
        assertFalse(html.contains("<script") || html.contains("<b>") || html.contains("<i>"), html);
        assertTrue(html.contains("heat&lt;script&gt; in <span class=\"nb\">shed&amp;1</span>"), html);
        assertTrue(html.contains("acknowledged by &lt;i&gt;Sam&lt;/i&gt;"), html);
        assertTrue(html.contains("the history cannot be read: &lt;locked&gt;"), html);
        assertEquals(1, html.split("<style>", -1).length - 1, "the barn page's one style sheet");
        assertTrue(html.contains("<meta http-equiv=\"refresh\" content=\"60\">"));
    }

    @Test
    void aSitesOwnPageLeadsBackToTheListAndShowsItsLink() {
        BarnView v = new BarnView(List.of(shed("larkmoor")), List.of(alert("k7m2xq9rtb", "heat-stress", "larkmoor/cow-shed", "warning", 42, null)),
                List.of(), null, BarnView.SiteState.of(false, DAY.minus(Duration.ofMinutes(20))));
        String html = BarnPageHtml.page(new BarnPageHtml.Site("larkmoor", BarnPageHtmlTest.LONDON, false), v, DAY);
        assertTrue(html.contains("<a href=\"/\" id=\"all-sites\">&larr; All sites</a> &middot; <span class=\"state off\" data-state=\"offline\">"
                + "offline</span> <span class=\"nb heard\">last message 20 min ago</span>"), html);
        assertTrue(html.contains("href=\"/ack/k7m2xq9rtb\""), "acknowledged from the centre as on a barn");
        assertTrue(html.contains("data-zone=\"larkmoor/cow-shed\"><h2><span>cow-shed</span>"), "zones named within the site: " + html);
        assertTrue(html.contains("heat-stress in <span class=\"nb\">cow-shed</span>"), html);
        assertFalse(html.contains("id=\"silent\""), "a site's sensors are its barn's: no silent list at the centre");
        assertFalse(BarnPageHtml.page(BarnPageHtmlTest.METRIC, new BarnView(List.of(), List.of(), List.of(), null), DAY).contains("all-sites"),
                "a barn's page has no list to go back to");
    }

    @Test
    void anAlertKnownFromTheSitesAlertStateSaysSo() {
        OpenIncident a = alert("k7m2xq9rtb", "calves-cold", "larkmoor/calf-barn", "critical", 42, null);
        OpenIncident learnt = new OpenIncident(a.id(), a.watch(), a.zone(), a.level(), a.quantity(), a.value(), a.unit(), a.since(),
                a.raisedAt(), a.message(), a.told(), false, null, null, true);
        String mark = "<span class=\"known\">known from the site&#39;s alert state</span>";
        SitesView.Site site = site("larkmoor", true, 1, List.of(learnt), shed("larkmoor"));
        assertTrue(card(SitesPageHtml.page(HUB, new SitesView(List.of(site), null), DAY), "larkmoor").contains(mark));
        BarnView v = new BarnView(List.of(shed("larkmoor")), List.of(learnt), List.of(), null, BarnView.SiteState.of(true, DAY));
        assertTrue(BarnPageHtml.page(new BarnPageHtml.Site("larkmoor", BarnPageHtmlTest.LONDON, false), v, DAY).contains(mark));
        SitesView.Site seen = site("larkmoor", true, 1, List.of(a), shed("larkmoor"));
        assertFalse(SitesPageHtml.page(HUB, new SitesView(List.of(seen), null), DAY).contains("class=\"known\""), "its events were seen");
    }

    /** The card of one site. */
    static String card(String html, String site) {
        int at = html.indexOf("data-site=\"" + site.replace("<", "&lt;").replace(">", "&gt;") + "\"");
        assertTrue(at > 0, "no card for " + site + ": " + html);
        int start = html.lastIndexOf("<article", at);
        return html.substring(start, html.indexOf("</article>", at) + "</article>".length());
    }
}
