package byre.cli;

import byre.admin.OpenAlert;
import byre.alerts.AckLinks;
import byre.alerts.EventText;
import byre.climate.ThiScale;
import byre.config.ByreConfig;
import byre.units.Quantity;
import byre.units.Unit;
import java.time.Duration;
import java.time.Instant;
import java.time.ZonedDateTime;
import java.time.format.DateTimeFormatter;
import java.util.List;
import java.util.Locale;

/**
 * Renders {@code byre status}: a pure function of (configuration, gathered data, now, colour) so that it is tested
 * with a fixed clock. Values are shown in the site's units ({@code units: metric|us}); colour marks what needs a look
 * (stale values, silent sensors, open alerts), and the same facts are always also said in words.
 */
final class StatusScreen {
    /** The indices that get a 24-hour trend line. */
    static final List<Quantity> TREND_KEYS = List.of(Quantity.THI, Quantity.WIND_CHILL, Quantity.RH, Quantity.DRY_BULB);
    static final int TREND_HOURS = 24;

    private static final String BOLD = "\u001b[1m";
    private static final String RED = "\u001b[31m";
    private static final String YELLOW = "\u001b[33m";
    private static final String GREEN = "\u001b[32m";
    private static final String DIM = "\u001b[2m";
    private static final String RESET = "\u001b[0m";
    private static final DateTimeFormatter WHEN = DateTimeFormatter.ofPattern("yyyy-MM-dd HH:mm z", Locale.ROOT);

    private final boolean colour;
    private final StringBuilder sb = new StringBuilder(2048);

    private StatusScreen(boolean colour) {
        this.colour = colour;
    }

    static String render(ByreConfig cfg, StatusData data, Instant now, boolean colour) {
        return new StatusScreen(colour).draw(cfg, data, now);
    }

    private String draw(ByreConfig cfg, StatusData data, Instant now) {
        boolean us = cfg.units() == ByreConfig.DisplayUnits.US;
        EventText words = new EventText(cfg.site(), us, AckLinks.NONE);
        line(paint(BOLD, "byre status: " + cfg.site()) + ", " + ZonedDateTime.ofInstant(now, cfg.timezone()).format(WHEN)
                + " (" + (us ? "US units" : "metric units") + ")");
        StatusData.Daemon d = data.daemon();
        if (!d.reachable()) {
            line("daemon: " + paint(YELLOW, "not answering on its admin API") + "; values read from the history database");
        } else if (d.healthy()) {
            line("daemon: running, " + paint(GREEN, "healthy"));
        } else {
            line("daemon: running, " + paint(RED, "NOT HEALTHY") + ": " + String.join("; ", d.problems()));
        }

        for (StatusData.Zone z : data.zones()) {
            line("");
            line(paint(BOLD, z.id()) + (z.groups().isEmpty() ? "" : " (" + String.join(", ", z.groups()) + ")"));
            if (z.values().isEmpty()) {
                line("  " + paint(YELLOW, "no readings stored yet"));
                continue;
            }
            line(paint(DIM, String.format(Locale.ROOT, "  %-14s %10s %-6s %6s  %-24s  %s", "quantity", "value", "unit", "age",
                    "last 24 h (hourly)", "range / note")));
            for (Quantity q : Quantity.values()) {
                StatusData.Value v = z.values().get(q);
                if (v == null) continue;
                Unit u = CalcCommand.displayUnit(q, us);
                Duration age = Duration.between(v.at(), now);
                boolean stale = age.compareTo(z.maxAge()) > 0;
                String ageText = age(age);
                String trend = "";
                String note = "";
                double[] t = z.trends().get(q);
                if (t != null) {
                    trend = Sparkline.draw(t);
                    note = range(t, u);
                }
                if (q == Quantity.THI) {
                    String cat = ThiScale.LWSI.category(v.value());
                    boolean normal = cat.equals(ThiScale.LWSI.bands().get(0).name());
                    note = (note.isEmpty() ? "" : note + "  ") + "LWSI " + (normal ? cat : paint(v.value() >= 79 ? RED : YELLOW, cat));
                }
                if (stale) note = (note.isEmpty() ? "" : note + "  ") + paint(YELLOW, "stale");
                line(String.format(Locale.ROOT, "  %-14s %10s %-6s %6s  %-24s  %s", q.id(), number(u.fromCanonical(v.value()), q, u),
                        u.symbol(), stale ? paint(YELLOW, pad(ageText, 6)) : ageText, trend, note).stripTrailing());
            }
        }

        line("");
        String from = data.alertsFrom();
        if (data.alerts().isEmpty()) {
            line(paint(BOLD, "open alerts") + ": none" + (from == null ? " known (no alert state yet)" : " (" + from + ")"));
        } else {
            line(paint(BOLD, "open alerts") + " (" + from + "):");
            for (OpenAlert a : data.alerts()) {
                String level = a.level() == null ? "?" : a.level();
                String lvl = paint(level.equals("critical") ? RED : level.equals("warning") ? YELLOW : "", String.format(Locale.ROOT, "%-8s", level));
                // The value reads as in the alert's messages (the same wording, one decimal, the THI band).
                String value = a.quantity() == null || Double.isNaN(a.value()) ? "" : " " + words.reading(a.quantity(), a.value()) + ",";
                String since = a.since() == null ? "" : " open " + EventText.duration(Duration.between(a.since(), now));
                String ack = a.acknowledgedBy() == null ? paint(BOLD, "not acknowledged")
                        : "acknowledged by " + a.acknowledgedBy() + (a.acknowledgedAt() == null ? "" : " " + age(Duration.between(a.acknowledgedAt(), now)) + " ago");
                String incident = a.incident() == null ? "" : "; incident " + a.incident();
                String known = a.fromAlertState() ? "; " + byre.alerts.OpenIncident.FROM_ALERT_STATE : "";
                line(("  " + lvl + " " + a.watch() + " in " + a.zone() + ":" + value + since).replaceAll(",$", "") + "; " + ack + incident + known);
            }
        }

        line("");
        if (data.silent().isEmpty()) {
            line(paint(BOLD, "silent sensors") + ": none");
        } else {
            line(paint(BOLD, "silent sensors") + " (no reading within the zone's max-age):");
            for (StatusData.Silent s : data.silent()) {
                String where = s.zone() == null ? "" : " (" + s.zone() + ")";
                String last = s.lastAt() == null ? "never reported" : "last reading " + age(Duration.between(s.lastAt(), now)) + " ago";
                line("  " + paint(RED, s.sensor()) + where + ": " + last);
            }
        }
        return sb.toString();
    }

    private void line(String s) {
        sb.append(s).append('\n');
    }

    private String paint(String code, String text) {
        return colour && !code.isEmpty() ? code + text + RESET : text;
    }

    private static String pad(String s, int width) {
        return s.length() >= width ? s : " ".repeat(width - s.length()) + s;
    }

    /** 45s, 12m, 5h, 3d; "future" when the clock of a sensor is ahead. */
    static String age(Duration d) {
        long s = d.toSeconds();
        if (s < -5) return "future";
        if (s < 90) return Math.max(0, s) + "s";
        if (s < 90 * 60) return (s / 60) + "m";
        if (s < 48 * 3600) return (s / 3600) + "h";
        return (s / 86400) + "d";
    }

    static String number(double v, Quantity q, Unit u) {
        int decimals = switch (q.dimension()) {
            case RELATIVE_HUMIDITY, IRRADIANCE -> 0;
            case SPEED -> u == Unit.FT_PER_MIN ? 0 : 1;
            case PRESSURE -> q == Quantity.VPD ? 2 : (u == Unit.INHG ? 2 : 1);
            case TEMPERATURE, HUMIDITY_RATIO, ENTHALPY, INDEX -> 1;
        };
        return CalcCommand.fmt(v, decimals);
    }

    private static String range(double[] t, Unit u) {
        byre.history.Extent extent = byre.history.Extent.of(t);
        double lo = extent.lo();
        double hi = extent.hi();
        if (lo > hi) return "";
        return CalcCommand.fmt(u.fromCanonical(lo), 1) + ".." + CalcCommand.fmt(u.fromCanonical(hi), 1);
    }
}
