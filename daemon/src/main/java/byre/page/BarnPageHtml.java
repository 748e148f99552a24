package byre.page;

import static byre.page.Html.esc;

import byre.alerts.IncidentBook;
import byre.alerts.OpenIncident;
import byre.climate.ThiScale;
import byre.units.Quantity;
import byre.units.Unit;
import java.nio.charset.StandardCharsets;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneId;
import java.time.ZonedDateTime;
import java.time.format.DateTimeFormatter;
import java.util.Base64;
import java.util.List;
import java.util.Locale;

/**
 * Draws the barn page and the pages of the acknowledgement link: pure functions of what was gathered and the time,
 * so they are tested with a fixed clock. Server-rendered HTML with one inline style sheet and inline SVG; nothing
 * is fetched from anywhere (the farm network may have no internet), and no script runs.
 *
 * <p>Made for a phone held in a dark barn: open alerts first, one large number per zone (THI with its band in
 * words), the rest in a two-column grid; dark colours from 19:00 to 07:00 farm time, or whenever the phone asks for a
 * dark scheme. Band colours come from the Okabe-Ito palette (Okabe and Ito 2008, "Color Universal Design"), which
 * stays distinguishable with the common colour-vision deficiencies; each band is also named in words, and black
 * text on every band colour has a contrast ratio of at least 5:1 (WCAG 2.1).
 */
final class BarnPageHtml {
    /** Farm-time hours in which the page is dark even when the phone does not ask for it. */
    static final int NIGHT_FROM_HOUR = 19;
    static final int NIGHT_TO_HOUR = 7;
    /** The page reloads itself this often (seconds). */
    static final int REFRESH_SECONDS = 60;
    /** THI bands shown: the Livestock Weather Safety Index, as in {@code byre status}. */
    static final ThiScale SCALE = ThiScale.LWSI;
    /** NWS: the heat index applies from 80 F (26.7 C). */
    static final double HEAT_INDEX_FROM_C = 26.7;

    /** Band colours in LWSI order (normal, alert, danger, emergency): Okabe-Ito sky blue, yellow, orange, vermillion. */
    static final List<String> BAND_COLOURS = List.of("#56B4E9", "#F0E442", "#E69F00", "#D55E00");

    static final String CSS = """
            :root{--bg:#f3f3ef;--card:#fff;--fg:#111;--muted:#4a4a4a;--line:#c8c8c0;--trend:#0b4f8a;color-scheme:light}
            html.night{--bg:#000;--card:#141414;--fg:#dcdcdc;--muted:#a0a0a0;--line:#3a3a3a;--trend:#8cc4ee;color-scheme:dark}
            @media (prefers-color-scheme:dark){:root{--bg:#000;--card:#141414;--fg:#dcdcdc;--muted:#a0a0a0;--line:#3a3a3a;--trend:#8cc4ee;color-scheme:dark}}
            *{box-sizing:border-box}
            body{margin:0;padding:10px;background:var(--bg);color:var(--fg);font:17px/1.35 system-ui,-apple-system,"Segoe UI",Roboto,sans-serif;max-width:640px;margin:0 auto}
            h1{font-size:1.5rem;margin:0}h2{font-size:1.15rem;margin:18px 0 8px}
            header{display:flex;justify-content:space-between;align-items:flex-end;gap:8px}
            a{color:var(--trend)}
            .clock{font-size:1.9rem;font-weight:700;font-variant-numeric:tabular-nums}
            .sub,.meta,.note,.axis{color:var(--muted);font-size:.9rem}
            .card{background:var(--card);border:1px solid var(--line);border-radius:10px;padding:10px 12px;margin:0 0 10px}
            .alert{border-left:8px solid var(--lvl)}
            .lvl-info{--lvl:#56B4E9}.lvl-warning{--lvl:#E69F00}.lvl-critical{--lvl:#D55E00}
            .what{font-weight:700;font-size:1.1rem;margin:0}
            .level{display:inline-block;background:var(--lvl);color:#000;font-weight:700;border-radius:4px;padding:0 6px;margin-right:6px;font-size:.85rem;text-transform:uppercase;letter-spacing:.03em}
            .reading{font-size:1.6rem;font-weight:700;margin:4px 0;font-variant-numeric:tabular-nums}
            .msg{margin:4px 0}
            .card p{margin:4px 0}
            .ackrow{display:flex;flex-wrap:wrap;align-items:center;justify-content:space-between;gap:8px;margin-top:8px}
            .ackrow .button{padding:10px 14px}
            .unacked{font-weight:700}
            .id{font-family:ui-monospace,monospace;font-size:1rem}
            a.button,button{display:inline-block;font:inherit;font-weight:700;padding:12px 18px;border-radius:8px;border:2px solid var(--fg);background:var(--fg);color:var(--bg);text-decoration:none;min-height:48px}
            .nb{white-space:nowrap}
            button.wide{width:100%}
            .zone h2{margin:0 0 6px;display:flex;justify-content:space-between;gap:8px}
            .thi{display:flex;align-items:center;gap:12px;margin:2px 0 8px}
            .big{font-size:3.2rem;font-weight:800;line-height:1;font-variant-numeric:tabular-nums}
            .band{display:inline-block;color:#000;font-weight:800;font-size:1.15rem;border-radius:6px;padding:3px 10px;border:2px solid #000}
            .b0{background:#56B4E9}.b1{background:#F0E442}.b2{background:#E69F00}.b3{background:#D55E00}
            dl.vals{display:grid;grid-template-columns:1fr 1fr;gap:6px 12px;margin:0}
            dl.vals div{min-width:0}dt{color:var(--muted);font-size:.85rem}dd{margin:0;font-size:1.45rem;font-weight:700;font-variant-numeric:tabular-nums}
            .stale{opacity:.6}.stale dd::after{content:" stale";font-size:.8rem;font-weight:400}
            figure{margin:10px 0 0}figcaption{font-size:.9rem}
            svg.trend{width:100%;height:64px;display:block;border-bottom:1px solid var(--line)}
            .axis{display:flex;justify-content:space-between}
            ul.silent{margin:0;padding-left:20px}
            label{display:block;margin:10px 0 4px}
            input{font:inherit;width:100%;padding:10px;border-radius:6px;border:1px solid var(--line);background:var(--bg);color:var(--fg)}
            footer{margin:18px 0 8px}
            .state{font-weight:700}.state.off{background:#D55E00;color:#000;border-radius:4px;padding:0 6px}
            .site h2{margin:0 0 4px;display:flex;flex-wrap:wrap;justify-content:space-between;align-items:baseline;gap:2px 10px}
            .site h2 a{color:inherit;display:inline-block;padding:6px 0}.site h2 .sub{font-weight:400}
            ul.keys{list-style:none;margin:6px 0 0;padding:0}
            ul.keys li{display:flex;flex-wrap:wrap;align-items:center;gap:2px 10px;border-top:1px solid var(--line);padding:6px 0 0;margin-top:6px}
            .zn{flex:1 0 100%;color:var(--muted);font-size:.9rem}
            .kv{font-size:1.3rem;font-weight:700;font-variant-numeric:tabular-nums}
            ul.keys .band{font-size:.95rem;padding:0 8px}
            """;
    /** The style sheet's hash for the Content-Security-Policy, so no other inline style may run. */
    static final String CSS_HASH = "sha256-" + sha256(CSS);

    private static final DateTimeFormatter CLOCK = DateTimeFormatter.ofPattern("HH:mm", Locale.ROOT);
    private static final DateTimeFormatter DAY = DateTimeFormatter.ofPattern("EEE d MMM", Locale.ROOT);
    private static final DateTimeFormatter WHEN = DateTimeFormatter.ofPattern("EEE d MMM HH:mm", Locale.ROOT);

    private BarnPageHtml() {}

    /** The page's settings that drawing needs. */
    record Site(String name, ZoneId timezone, boolean us) {}

    // ---- the barn page ----

    static String page(Site site, BarnView v, Instant now) {
        StringBuilder sb = new StringBuilder(16_384);
        head(sb, site, now, site.name() + " barn", true);
        header(sb, site, now);
        if (v.state() != null) {
            sb.append("<nav class=\"sub\"><a href=\"/\" id=\"all-sites\">&larr; All sites</a> &middot; ");
            linkState(sb, v.state(), now);
            sb.append("</nav>\n");
        }
        if (v.problem() != null) sb.append("<p class=\"card\"><strong>").append(esc(v.problem())).append("</strong></p>\n");

        alerts(sb, site, v, now);
        sb.append("<section id=\"zones\"><h2>Zones</h2>\n");
        for (BarnView.Zone z : v.zones()) zone(sb, site, z, v, now);
        sb.append("</section>\n");
        // A site seen from the centre has no sensors here: its barn's page lists its silent ones.
        if (v.state() == null || v.state().self()) silent(sb, v, now);

        footer(sb, site);
        return sb.toString();
    }

    /** The name, the day and the farm's time, large. */
    static void header(StringBuilder sb, Site site, Instant now) {
        ZonedDateTime local = now.atZone(site.timezone());
        sb.append("<header><div><h1>").append(esc(site.name())).append("</h1><div class=\"sub\">")
                .append(esc(local.format(DAY))).append(", farm time</div></div>")
                .append("<div class=\"clock\" id=\"farm-time\">").append(local.format(CLOCK)).append("</div></header>\n");
    }

    /** Time zone, units, the THI bands and their source, the safety note; the end of the page. */
    static void footer(StringBuilder sb, Site site) {
        sb.append("<footer class=\"note\"><p>Farm time is ").append(esc(site.timezone().getId())).append(". Values in ")
                .append(site.us() ? "US units" : "metric units")
                .append(". THI bands: ").append(esc(SCALE.source())).append("; ");
        for (int i = 0; i < SCALE.bands().size(); i++) {
            ThiScale.Band b = SCALE.bands().get(i);
            sb.append(i == 0 ? "" : ", ").append(esc(b.name())).append(i == 0 ? " below " + fmt(SCALE.bands().get(1).from(), 0) : " from " + fmt(b.from(), 0));
        }
        sb.append(".</p><p>Alerts and bands supplement, never replace, regular checks of the animals, their water and "
                + "ventilation. Adapt every threshold with the herd&#39;s veterinarian and local codes of practice.</p>")
                .append("<p>Refreshes every minute.</p></footer>\n</body></html>\n");
    }

    /** Unacknowledged first, then the most severe, then the oldest: what needs someone comes to the top. */
    static final java.util.Comparator<OpenIncident> URGENCY = java.util.Comparator
            .comparing((OpenIncident a) -> a.ackBy() != null)
            .thenComparing(a -> -severity(a.level()))
            .thenComparing(a -> a.since() == null ? a.raisedAt() : a.since(), java.util.Comparator.nullsLast(java.util.Comparator.naturalOrder()));

    /** 3 for critical, 2 warning, 1 info, 0 none or unknown. */
    static int severity(String level) {
        return level == null ? 0 : switch (level) {
            case "critical" -> 3;
            case "warning" -> 2;
            case "info" -> 1;
            default -> 0;
        };
    }

    private static void alerts(StringBuilder sb, Site site, BarnView v, Instant now) {
        List<OpenIncident> open = v.alerts().stream().sorted(URGENCY).toList();
        sb.append("<section id=\"alerts\"><h2>").append(open.isEmpty() ? "No open alerts" : "Open alerts (" + open.size() + ")").append("</h2>\n");
        for (OpenIncident a : open) {
            sb.append("<article class=\"card alert lvl-").append(esc(levelWord(a))).append("\" data-incident=\"").append(esc(a.id())).append("\">");
            details(sb, site, a, zoneName(site, v, a.zone()), now);
            if (a.ackBy() == null) {
                sb.append("<div class=\"ackrow\"><span class=\"unacked\">Not acknowledged</span><a class=\"button\" href=\"/ack/")
                        .append(esc(a.id())).append("\">Acknowledge&hellip;</a></div>");
            } else {
                sb.append("<p class=\"acked\">Acknowledged by ").append(esc(a.ackBy()));
                if (a.ackAt() != null) sb.append(", ").append(esc(IncidentBook.human(Duration.between(a.ackAt(), now)))).append(" ago");
                sb.append("</p>");
            }
            sb.append("</article>\n");
        }
        sb.append("</section>\n");
    }

    /** "THI 80.6 (danger)" or "air 3.1 C": the incident's quantity and value in the site's units; empty when it has none. */
    static String reading(OpenIncident a, boolean us) {
        Quantity q = a.quantity() == null ? null : Quantity.byId(a.quantity()).orElse(null);
        if (q == null || !Double.isFinite(a.value())) return "";
        Unit u = displayUnit(q, us);
        String s = esc(label(q)) + " " + number(u.fromCanonical(a.value()), q, u) + unitSuffix(u);
        if (q == Quantity.THI) s += " " + bandChip(a.value());
        return s;
    }

    private static void zone(StringBuilder sb, Site site, BarnView.Zone z, BarnView v, Instant now) {
        long alerts = v.alerts().stream().filter(a -> z.id().equals(a.zone())).count();
        sb.append("<article class=\"card zone\" id=\"zone-").append(esc(z.id())).append("\" data-zone=\"").append(esc(z.id())).append("\">");
        sb.append("<h2><span>").append(esc(zoneName(site, v, z.id()))).append("</span>");
        if (alerts > 0) sb.append("<a href=\"#alerts\">").append(alerts).append(alerts == 1 ? " open alert" : " open alerts").append("</a>");
        sb.append("</h2>");
        if (!z.groups().isEmpty()) sb.append("<div class=\"sub\">").append(esc(String.join(", ", z.groups()))).append("</div>");
        if (z.values().isEmpty()) {
            sb.append("<p>No readings yet.</p></article>\n");
            return;
        }
        BarnView.Value thi = z.values().get(Quantity.THI);
        if (thi != null) {
            boolean stale = stale(thi, z, now);
            sb.append("<div class=\"thi").append(stale ? " stale" : "").append("\" data-q=\"thi\"><div><div class=\"sub\">THI</div><span class=\"big\">")
                    .append(fmt(thi.value(), 1)).append("</span></div>").append(bandChip(thi.value()));
            if (stale) sb.append("<span class=\"sub\">").append(esc(ago(thi, now))).append("</span>");
            sb.append("</div>");
        }
        sb.append("<dl class=\"vals\">");
        BarnView.Value dry = z.values().get(Quantity.DRY_BULB);
        for (Quantity q : TILES) {
            BarnView.Value val = z.values().get(q);
            if (val == null || !shown(q, val, dry)) continue;
            Unit u = displayUnit(q, site.us());
            boolean stale = stale(val, z, now);
            sb.append("<div data-q=\"").append(q.id()).append("\"").append(stale ? " class=\"stale\" title=\"" + esc(ago(val, now)) + "\"" : "")
                    .append("><dt>").append(esc(label(q))).append("</dt><dd>").append(number(u.fromCanonical(val.value()), q, u))
                    .append(unitSuffix(u)).append("</dd></div>");
        }
        sb.append("</dl>");
        for (Quantity q : BarnPageSource.TREND_KEYS) {
            double[] t = z.trends().get(q);
            if (t != null) trend(sb, q, t, site.us());
        }
        sb.append("</article>\n");
    }

    /** The values in the grid, in order; THI has its own line. */
    static final List<Quantity> TILES = List.of(Quantity.DRY_BULB, Quantity.RH, Quantity.AIR_SPEED, Quantity.WIND_CHILL,
            Quantity.HEAT_INDEX, Quantity.DEW_POINT);

    /** Wind chill only when it differs from the air (NWS: equal in calm or warm air); heat index only where it applies. */
    static boolean shown(Quantity q, BarnView.Value v, BarnView.Value dry) {
        return switch (q) {
            case WIND_CHILL -> dry == null || Math.abs(v.value() - dry.value()) >= 0.5;
            case HEAT_INDEX -> dry == null || dry.value() >= HEAT_INDEX_FROM_C;
            default -> true;
        };
    }

    private static void silent(StringBuilder sb, BarnView v, Instant now) {
        sb.append("<section id=\"silent\"><h2>").append(v.silent().isEmpty() ? "No silent sensors" : "Silent sensors (" + v.silent().size() + ")")
                .append("</h2>");
        if (!v.silent().isEmpty()) {
            sb.append("<div class=\"card\"><ul class=\"silent\">");
            for (BarnView.Silent s : v.silent()) {
                sb.append("<li data-sensor=\"").append(esc(s.sensor())).append("\"><strong>").append(esc(s.sensor())).append("</strong>");
                if (s.zone() != null) sb.append(" (").append(esc(s.zone())).append(")");
                sb.append(": ").append(s.lastAt() == null ? "never reported"
                        : "last reading " + esc(IncidentBook.human(Duration.between(s.lastAt(), now))) + " ago").append("</li>");
            }
            sb.append("</ul></div>");
        }
        sb.append("</section>\n");
    }

    // ---- the 24-hour trend ----

    private static final int W = 320;
    private static final int H = 64;

    /** One quantity's 24 hours as an inline SVG line (gaps where nothing was stored), THI over its band colours. */
    static void trend(StringBuilder sb, Quantity q, double[] cells, boolean us) {
        Unit u = displayUnit(q, us);
        byre.history.Extent extent = byre.history.Extent.of(cells);
        double lo = extent.lo();
        double hi = extent.hi();
        if (lo > hi) return;
        String range = number(u.fromCanonical(lo), q, u) + " to " + number(u.fromCanonical(hi), q, u) + unitSuffix(u);
        double pad = Math.max((hi - lo) * 0.1, q == Quantity.THI ? 1 : 0.5);
        double yLo = lo - pad;
        double yHi = hi + pad;
        sb.append("<figure data-trend=\"").append(q.id()).append("\"><figcaption>").append(esc(label(q))).append(", last 24 h: ").append(range)
                .append("</figcaption><svg class=\"trend\" viewBox=\"0 0 ").append(W).append(' ').append(H)
                .append("\" preserveAspectRatio=\"none\" role=\"img\" aria-label=\"").append(esc(label(q))).append(" over the last 24 hours, ")
                .append(esc(range)).append("\">");
        if (q == Quantity.THI) {
            List<ThiScale.Band> bands = SCALE.bands();
            for (int i = 0; i < bands.size(); i++) {
                double from = Math.max(bands.get(i).from(), yLo);
                double to = Math.min(i + 1 < bands.size() ? bands.get(i + 1).from() : Double.POSITIVE_INFINITY, yHi);
                if (from >= to) continue;
                double top = y(to, yLo, yHi);
                sb.append("<rect x=\"0\" y=\"").append(fmt(top, 1)).append("\" width=\"").append(W).append("\" height=\"")
                        .append(fmt(y(from, yLo, yHi) - top, 1)).append("\" fill=\"").append(BAND_COLOURS.get(i)).append("\" fill-opacity=\"0.3\"/>");
            }
        }
        StringBuilder d = new StringBuilder();
        double dx = (double) W / (cells.length - 1);
        boolean pen = false;
        for (int i = 0; i < cells.length; i++) {
            if (Double.isNaN(cells[i])) {
                pen = false;
                continue;
            }
            boolean single = !pen && (i + 1 >= cells.length || Double.isNaN(cells[i + 1]));
            d.append(pen ? 'L' : 'M').append(fmt(i * dx, 1)).append(' ').append(fmt(y(cells[i], yLo, yHi), 1));
            if (single) d.append('h').append(fmt(Math.max(dx, 2), 1)); // a lone bucket still shows as a dash
            pen = true;
        }
        sb.append("<path d=\"").append(d).append("\" fill=\"none\" stroke=\"var(--trend)\" stroke-width=\"2.5\" "
                + "stroke-linejoin=\"round\" vector-effect=\"non-scaling-stroke\"/></svg>")
                .append("<div class=\"axis\"><span>24 h ago</span><span>now</span></div></figure>");
    }

    private static double y(double v, double lo, double hi) {
        return H - (v - lo) / (hi - lo) * H;
    }

    // ---- acknowledgement pages ----

    /** The page a signed link opens: the alert and one button that posts back to the same address. */
    static String linkConfirm(Site site, OpenIncident a, String action, Instant now) {
        StringBuilder sb = new StringBuilder(4096);
        head(sb, site, now, "Acknowledge alert", false);
        sb.append("<h1>").append(esc(site.name())).append("</h1>");
        alertSummary(sb, site, a, now);
        sb.append("<form method=\"post\" action=\"").append(esc(action)).append("\"><button type=\"submit\" id=\"ack\" class=\"wide\">Acknowledge: I am on it</button></form>")
                .append("<p class=\"note\">Acknowledging stops reminders and escalation for this alert and tells the people already told. "
                        + "It does not clear the alert: that happens when the barn is back in range.</p>");
        return end(sb);
    }

    /** The page that asks for the admin token before acknowledging from the barn page. */
    static String tokenForm(Site site, OpenIncident a, Instant now, boolean tokenAlreadyGiven) {
        StringBuilder sb = new StringBuilder(4096);
        head(sb, site, now, "Acknowledge alert", false);
        sb.append("<h1>").append(esc(site.name())).append("</h1>");
        alertSummary(sb, site, a, now);
        sb.append("<form method=\"post\" action=\"/ack/").append(esc(a.id())).append("\">");
        if (!tokenAlreadyGiven) {
            sb.append("<label for=\"token\">Admin token</label><input id=\"token\" name=\"token\" type=\"password\" autocomplete=\"current-password\" required>");
        }
        sb.append("<label for=\"by\">Your name (optional)</label><input id=\"by\" name=\"by\" type=\"text\" maxlength=\"80\" autocomplete=\"name\">")
                .append("<p><button type=\"submit\" id=\"ack\">Acknowledge</button></p></form><p><a href=\"/\">Back to the barn page</a></p>");
        return end(sb);
    }

    private static void alertSummary(StringBuilder sb, Site site, OpenIncident a, Instant now) {
        sb.append("<article class=\"card alert lvl-").append(esc(levelWord(a))).append("\" data-incident=\"").append(esc(a.id())).append("\">");
        details(sb, site, a, a.zone(), now);
        sb.append("</article>");
    }

    /** An alert's level, watch and zone, its reading, message, age and incident id (the card's body before acknowledging). */
    private static void details(StringBuilder sb, Site site, OpenIncident a, String zone, Instant now) {
        what(sb, a, zone);
        String reading = reading(a, site.us());
        if (!reading.isEmpty()) sb.append("<p class=\"reading\">").append(reading).append("</p>");
        if (a.message() != null && !a.message().isBlank()) sb.append("<p class=\"msg\">").append(esc(a.message())).append("</p>");
        sb.append("<p class=\"meta\">open ").append(esc(openFor(a, now)))
                .append(" &middot; incident <span class=\"id\">").append(esc(a.id())).append("</span>");
        if (a.fromAlertState()) sb.append(" &middot; <span class=\"known\">").append(esc(OpenIncident.FROM_ALERT_STATE)).append("</span>");
        sb.append("</p>");
    }

    /** A zone as named on the page: on a central byre's page of one site, within that site ({@code cow-shed}). */
    private static String zoneName(Site site, BarnView v, String zone) {
        return v.state() == null || v.state().self() ? zone : SitesPageHtml.within(site.name(), zone);
    }

    /** "WARNING heat-stress in cow-shed": the level chip, the watch, and {@code zone} as shown (none when empty). */
    static void what(StringBuilder sb, OpenIncident a, String zone) {
        sb.append("<p class=\"what\"><span class=\"level\">").append(esc(a.level() == null ? "info" : a.level())).append("</span>").append(esc(a.watch()));
        if (zone != null && !zone.isEmpty()) sb.append(" in <span class=\"nb\">").append(esc(zone)).append("</span>");
        sb.append("</p>");
    }

    /** How long an alert has been open: "42 min". */
    static String openFor(OpenIncident a, Instant now) {
        return IncidentBook.human(Duration.between(a.since() == null ? a.raisedAt() : a.since(), now));
    }

    /** The alert's level as a CSS class word ({@code lvl-<word>} colours its card). */
    static String levelWord(OpenIncident a) {
        return cssWord(a.level() == null ? "info" : a.level());
    }

    /** "online last message 20 s ago", "offline last message 3 h ago", "no status yet nothing heard yet", or "this byre". */
    static void linkState(StringBuilder sb, BarnView.SiteState s, Instant now) {
        if (s.self()) {
            sb.append("<span class=\"state\">this byre</span>");
            return;
        }
        String word = s.online() == null ? "unknown" : s.online() ? "online" : "offline";
        sb.append("<span class=\"state").append(Boolean.FALSE.equals(s.online()) ? " off" : "").append("\" data-state=\"").append(word)
                .append("\">").append(s.online() == null ? "no status yet" : word).append("</span> <span class=\"nb heard\">");
        if (s.lastHeard() == null) {
            sb.append("nothing heard yet</span>");
        } else {
            Duration ago = Duration.between(s.lastHeard(), now);
            // A site's clock a little ahead of the centre's reads "0 s ago", not a negative time.
            sb.append("last message ").append(esc(IncidentBook.human(ago.isNegative() ? Duration.ZERO : ago))).append(" ago</span>");
        }
    }

    /** A page that says what happened (or why nothing did) and leads back to the barn page. */
    static String outcome(Site site, Instant now, String title, String text) {
        StringBuilder sb = new StringBuilder(2048);
        head(sb, site, now, title, false);
        sb.append("<h1>").append(esc(site.name())).append("</h1><div class=\"card\"><p class=\"what\" id=\"outcome\">").append(esc(title))
                .append("</p><p>").append(esc(text)).append("</p></div><p><a href=\"/\">Open the barn page</a></p>");
        return end(sb);
    }

    // ---- shared parts ----

    static void head(StringBuilder sb, Site site, Instant now, String title, boolean refresh) {
        int hour = now.atZone(site.timezone()).getHour();
        boolean night = hour >= NIGHT_FROM_HOUR || hour < NIGHT_TO_HOUR;
        sb.append("<!DOCTYPE html>\n<html lang=\"en\"").append(night ? " class=\"night\"" : "").append(">\n<head><meta charset=\"utf-8\">")
                .append("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">")
                .append("<link rel=\"icon\" href=\"data:,\">") // no icon to fetch
                .append("<meta name=\"color-scheme\" content=\"").append(night ? "dark" : "light dark").append("\">");
        if (refresh) sb.append("<meta http-equiv=\"refresh\" content=\"").append(REFRESH_SECONDS).append("\">");
        sb.append("<title>").append(esc(title)).append("</title><style>").append(CSS).append("</style></head>\n<body>\n");
    }

    private static String end(StringBuilder sb) {
        return sb.append("\n</body></html>\n").toString();
    }

    static String when(Instant t, ZoneId zone) {
        return t.atZone(zone).format(WHEN);
    }

    static boolean stale(BarnView.Value v, BarnView.Zone z, Instant now) {
        return Duration.between(v.at(), now).compareTo(z.maxAge()) > 0;
    }

    static String ago(BarnView.Value v, Instant now) {
        return IncidentBook.human(Duration.between(v.at(), now)) + " old";
    }

    /** Band position 0..3 on the LWSI scale (selects the colour), judged on the value as shown, as the messages do. */
    static int bandIndex(double thi) {
        int idx = 0;
        List<ThiScale.Band> bands = SCALE.bands();
        for (int i = 0; i < bands.size(); i++) if (shown(thi) >= bands.get(i).from()) idx = i;
        return idx;
    }

    /** The band of a THI in words on its colour: {@code <span class="band b2">danger</span>}. */
    static String bandChip(double thi) {
        return "<span class=\"band b" + bandIndex(thi) + "\">" + esc(bandName(thi)) + "</span>";
    }

    /** The band's name for a THI, judged on the value as shown (one decimal): "84.0" never reads "danger". */
    static String bandName(double thi) {
        return SCALE.category(shown(thi));
    }

    private static double shown(double thi) {
        return Math.round(thi * 10) / 10.0;
    }

    /** The unit a value is shown in: the site's choice, as in the messages (F and mph in US units). */
    static Unit displayUnit(Quantity q, boolean us) {
        return byre.rules.eval.MessageText.displayUnit(q, us);
    }

    static String label(Quantity q) {
        return switch (q) {
            case DRY_BULB -> "Air";
            case RH -> "Humidity";
            case AIR_SPEED -> "Air speed";
            case WIND_CHILL -> "Wind chill";
            case HEAT_INDEX -> "Heat index";
            case DEW_POINT -> "Dew point";
            case THI -> "THI";
            default -> q.id();
        };
    }

    static String number(double v, Quantity q, Unit u) {
        int decimals = switch (q.dimension()) {
            case RELATIVE_HUMIDITY, IRRADIANCE -> 0;
            case SPEED -> u == Unit.FT_PER_MIN ? 0 : 1;
            case PRESSURE -> q == Quantity.VPD || u == Unit.INHG ? 2 : 1;
            default -> 1;
        };
        return fmt(v, decimals);
    }

    static String unitSuffix(Unit u) {
        String s = u.symbol();
        if (s.isEmpty()) return "";
        return (s.equals("%") ? "" : "\u00a0") + esc(s.equals("C") || s.equals("F") ? "\u00b0" + s : s);
    }

    static String fmt(double v, int decimals) {
        String s = String.format(Locale.ROOT, "%." + decimals + "f", v);
        if (s.startsWith("-") && Double.parseDouble(s) == 0) s = s.substring(1);
        return s;
    }

    private static String cssWord(String s) {
        return s.toLowerCase(Locale.ROOT).replaceAll("[^a-z0-9-]", "");
    }

    private static String sha256(String text) {
        try {
            return Base64.getEncoder().encodeToString(MessageDigest.getInstance("SHA-256").digest(text.getBytes(StandardCharsets.UTF_8)));
        } catch (NoSuchAlgorithmException e) {
            throw new IllegalStateException("SHA-256 is part of every Java runtime", e);
        }
    }
}
