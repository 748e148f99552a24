package byre.page;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.alerts.OpenIncident;
import byre.units.Quantity;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneId;
import java.util.Arrays;
import java.util.EnumMap;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/** The barn page drawn from gathered data at a fixed time: units, bands, what is shown when, escaping, day and night. */
class BarnPageHtmlTest {
    static final ZoneId LONDON = ZoneId.of("Europe/London");
    /** 13:05 UTC = 14:05 in London (summer time): day. */
    static final Instant DAY = Instant.parse("2026-07-14T13:05:00Z");
    static final BarnPageHtml.Site METRIC = new BarnPageHtml.Site("larkmoor", LONDON, false);
    static final BarnPageHtml.Site US = new BarnPageHtml.Site("larkmoor", LONDON, true);

    static BarnView.Zone zone(String id, Instant now, Object... quantityValueAgeMinutes) {
        Map<Quantity, BarnView.Value> values = new EnumMap<>(Quantity.class);
        for (int i = 0; i < quantityValueAgeMinutes.length; i += 3) {
            values.put((Quantity) quantityValueAgeMinutes[i], new BarnView.Value(((Number) quantityValueAgeMinutes[i + 1]).doubleValue(),
                    now.minus(Duration.ofMinutes(((Number) quantityValueAgeMinutes[i + 2]).longValue()))));
        }
        return new BarnView.Zone(id, List.of("cows"), Duration.ofMinutes(5), values, Map.of());
    }

    static OpenIncident incident(String id, String watch, String zone, String message, String ackBy) {
        return new OpenIncident(id, watch, zone, "warning", "thi", 84.2, "", DAY.minus(Duration.ofMinutes(42)), DAY.minus(Duration.ofMinutes(40)),
                message, List.of("night-phone"), false, ackBy, ackBy == null ? null : DAY.minus(Duration.ofMinutes(3)));
    }

    @Test
    void valuesInTheSitesUnits() {
        BarnView v = new BarnView(List.of(zone("cow-shed", DAY, Quantity.DRY_BULB, 30.0, 1, Quantity.AIR_SPEED, 2.0, 1, Quantity.THI, 78.95, 1)),
                List.of(), List.of(), null);
        String metric = BarnPageHtml.page(METRIC, v, DAY);
        assertTrue(metric.contains("<dd>30.0\u00a0°C</dd>"), metric);
        assertTrue(metric.contains("<dd>2.0\u00a0m/s</dd>"), metric);
        String us = BarnPageHtml.page(US, v, DAY);
        // 30 C = 86 F (9/5 * 30 + 32); 2 m/s = 4.47 mph (1 mile = 1609.344 m): common practice. Same units as the messages.
        assertTrue(us.contains("<dd>86.0\u00a0°F</dd>"), us);
        assertTrue(us.contains("<dd>4.5\u00a0mph</dd>"), us);
        // THI has no unit and is not converted; 78.95 shows as 79.0, and the band is judged on what is shown: LWSI
        // "danger" from 79 (so the number and its band never disagree on the screen).
        assertTrue(us.contains("<span class=\"big\">79.0</span></div><span class=\"band b2\">danger</span>"), us);
        assertTrue(us.contains("Values in US units"));
    }

    @Test
    void everyLwsiBandHasItsWordAndColour() {
        // Band edges of the Livestock Weather Safety Index (LCI 1970): normal < 75, alert 75-78, danger 79-83, emergency >= 84.
        double[] thi = {74.94, 74.96, 79.0, 83.96}; // judged as shown: 74.9, 75.0, 79.0, 84.0
        String[] word = {"normal", "alert", "danger", "emergency"};
        for (int i = 0; i < thi.length; i++) {
            assertEquals(i, BarnPageHtml.bandIndex(thi[i]));
            String html = BarnPageHtml.page(METRIC, new BarnView(List.of(zone("cow-shed", DAY, Quantity.THI, thi[i], 0)), List.of(), List.of(), null), DAY);
            assertTrue(html.contains("<span class=\"band b" + i + "\">" + word[i] + "</span>"), word[i]);
            assertTrue(BarnPageHtml.CSS.contains(".b" + i + "{background:" + BarnPageHtml.BAND_COLOURS.get(i) + "}"), "one colour table for CSS and SVG");
        }
    }

    @Test
    void windChillOnlyWhenItDiffersAndHeatIndexOnlyWhereItApplies() {
        String calm = BarnPageHtml.page(METRIC, new BarnView(List.of(zone("calf-pen-1", DAY, Quantity.DRY_BULB, 5.0, 0,
                Quantity.WIND_CHILL, 5.0, 0, Quantity.HEAT_INDEX, 5.0, 0)), List.of(), List.of(), null), DAY);
        assertFalse(calm.contains("data-q=\"wind-chill\""), "equal to the air: not shown");
        assertFalse(calm.contains("data-q=\"heat-index\""), "below 26.7 C (80 F, NWS): not shown");
        String windyHot = BarnPageHtml.page(METRIC, new BarnView(List.of(zone("calf-pen-1", DAY, Quantity.DRY_BULB, 27.0, 0,
                Quantity.WIND_CHILL, 25.0, 0, Quantity.HEAT_INDEX, 28.4, 0)), List.of(), List.of(), null), DAY);
        assertTrue(windyHot.contains("data-q=\"wind-chill\""));
        assertTrue(windyHot.contains("data-q=\"heat-index\""));
    }

    @Test
    void staleValuesAreMarked() {
        String html = BarnPageHtml.page(METRIC, new BarnView(List.of(zone("cow-shed", DAY, Quantity.DRY_BULB, 20.0, 12, Quantity.RH, 60, 1)),
                List.of(), List.of(), null), DAY);
        assertTrue(html.contains("<div data-q=\"dry-bulb\" class=\"stale\" title=\"12 min old\">"), html);
        assertTrue(html.contains("<div data-q=\"rh\"><dt>"), html);
    }

    @Test
    void everythingFromOutsideIsEscaped() {
        OpenIncident evil = incident("i1", "heat-stress", "cow-shed", "Fans <script>alert(1)</script> & \"water\"", "<b>Sam</b>");
        BarnView v = new BarnView(List.of(zone("cow-shed", DAY, Quantity.THI, 80.0, 0)), List.of(evil),
                List.of(new BarnView.Silent("shed-<rh>", "cow-shed", null)), "the history cannot be read: <locked>");
        String html = BarnPageHtml.page(METRIC, v, DAY);
        assertFalse(html.contains("<script>"), html);
        assertFalse(html.contains("<b>Sam"), html);
        assertTrue(html.contains("Fans &lt;script&gt;alert(1)&lt;/script&gt; &amp; &quot;water&quot;"), html);
        assertTrue(html.contains("Acknowledged by &lt;b&gt;Sam&lt;/b&gt;, 3 min ago"), html);
        assertTrue(html.contains("shed-&lt;rh&gt;"), html);
        assertTrue(html.contains("the history cannot be read: &lt;locked&gt;"), html);
        assertEquals("&lt;a href=&#39;x&#39;&gt;\uFFFD", Html.esc("<a href='x'>\u0007"));
    }

    @Test
    void openAlertsComeFirstWithAgeIncidentAndAcknowledgement() {
        BarnView v = new BarnView(List.of(zone("cow-shed", DAY, Quantity.THI, 84.2, 0)),
                List.of(incident("k7m2xq9rtb", "heat-stress", "cow-shed", "Heat stress in cow-shed", null)), List.of(), null);
        String html = BarnPageHtml.page(METRIC, v, DAY);
        assertTrue(html.indexOf("id=\"alerts\"") < html.indexOf("id=\"zones\""));
        assertTrue(html.contains("open 42 min &middot; incident <span class=\"id\">k7m2xq9rtb</span>"), html);
        assertTrue(html.contains("Not acknowledged"));
        assertTrue(html.contains("href=\"/ack/k7m2xq9rtb\""));
        assertTrue(html.contains("THI 84.2 <span class=\"band b3\">emergency</span>"), html);
        assertTrue(html.contains("1 open alert"));
    }

    @Test
    void unacknowledgedAndSevereAlertsComeFirst() {
        OpenIncident ackedCritical = new OpenIncident("a1", "calf-draught", "calf-pen-1", "critical", null, Double.NaN, "", DAY.minusSeconds(9000),
                DAY.minusSeconds(9000), "", List.of(), false, "Sam", DAY.minusSeconds(60));
        OpenIncident oldWarning = incident("a2", "heat-stress", "cow-shed", "", null);
        OpenIncident newCritical = new OpenIncident("a3", "calf-cold", "calf-pen-1", "critical", null, Double.NaN, "", DAY.minusSeconds(60),
                DAY.minusSeconds(60), "", List.of(), false, null, null);
        String html = BarnPageHtml.page(METRIC, new BarnView(List.of(), List.of(ackedCritical, oldWarning, newCritical), List.of(), null), DAY);
        int a1 = html.indexOf("data-incident=\"a1\"");
        int a2 = html.indexOf("data-incident=\"a2\"");
        int a3 = html.indexOf("data-incident=\"a3\"");
        assertTrue(a3 < a2 && a2 < a1, "critical unacknowledged, warning unacknowledged, then acknowledged: " + a3 + " " + a2 + " " + a1);
    }

    @Test
    void darkAtNightByFarmTimeAndOnRequestByDay() {
        String day = BarnPageHtml.page(METRIC, new BarnView(List.of(), List.of(), List.of(), null), DAY);
        assertTrue(day.contains("<html lang=\"en\">"));
        assertTrue(day.contains("@media (prefers-color-scheme:dark)"), "the phone's own dark setting wins by day");
        // 18:59 and 07:00 London time are day; 19:00 and 06:59 night (British Summer Time is UTC+1).
        assertFalse(BarnPageHtml.page(METRIC, new BarnView(List.of(), List.of(), List.of(), null), Instant.parse("2026-07-14T17:59:00Z")).contains("class=\"night\""));
        assertTrue(BarnPageHtml.page(METRIC, new BarnView(List.of(), List.of(), List.of(), null), Instant.parse("2026-07-14T18:00:00Z")).contains("<html lang=\"en\" class=\"night\">"));
        assertTrue(BarnPageHtml.page(METRIC, new BarnView(List.of(), List.of(), List.of(), null), Instant.parse("2026-07-14T05:59:00Z")).contains("class=\"night\""));
        assertFalse(BarnPageHtml.page(METRIC, new BarnView(List.of(), List.of(), List.of(), null), Instant.parse("2026-07-14T06:00:00Z")).contains("class=\"night\""));
        assertTrue(day.contains("<meta http-equiv=\"refresh\" content=\"60\">"));
        assertTrue(day.contains("id=\"farm-time\">14:05<"), day);
    }

    @Test
    void aTrendBreaksWhereNothingWasStored() {
        double[] cells = new double[BarnPageSource.TREND_CELLS];
        Arrays.fill(cells, Double.NaN);
        for (int i = 0; i < 10; i++) cells[i] = 70 + i;
        cells[50] = 75;
        for (int i = 80; i < cells.length; i++) cells[i] = 72;
        StringBuilder sb = new StringBuilder();
        BarnPageHtml.trend(sb, Quantity.THI, cells, false);
        String svg = sb.toString();
        String d = svg.substring(svg.indexOf(" d=\"") + 4);
        d = d.substring(0, d.indexOf('"'));
        assertEquals(3, d.chars().filter(c -> c == 'M').count(), "three runs: " + d);
        assertTrue(d.contains("h"), "the lone bucket is drawn as a dash");
        assertTrue(svg.contains("THI, last 24 h: 70.0 to 79.0"), svg);
        assertTrue(svg.contains("fill=\"#56B4E9\"") && svg.contains("fill=\"#F0E442\""), "THI drawn over its band colours");
        assertFalse(svg.contains("NaN"));
    }

    @Test
    void theStyleSheetIsTheOnlyThingThePolicyAllows() {
        assertTrue(PageServer.CSP.startsWith("default-src 'none'; style-src 'sha256-"));
        String html = BarnPageHtml.page(METRIC, new BarnView(List.of(), List.of(), List.of(), null), DAY);
        assertEquals(1, html.split("<style>", -1).length - 1);
        assertFalse(html.contains("<script") || html.contains(" style=\"") || html.contains("http://") || html.contains("https://"),
                "no script, no inline style attribute, nothing fetched");
    }
}
