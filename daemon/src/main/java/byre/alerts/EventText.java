package byre.alerts;

import byre.climate.ThiScale;
import byre.rules.eval.MessageText;
import byre.units.Quantity;
import byre.units.Unit;
import java.time.Duration;
import java.time.ZoneId;
import java.util.List;
import java.util.Locale;
import java.util.Optional;

/**
 * The one place that words alert events. Every event's {@code message} is made here, and every channel
 * (webhook, MQTT, email, command), the log, the demo console and {@code byre status} show that text, so one
 * event reads the same wherever it is seen. Pure: no I/O, no clock.
 *
 * <p>A raise names the site, the zone, the watch and its level, the value in the site's units with one decimal
 * and, for THI, its band of the Livestock Weather Safety Index ("THI 83.7, danger band"), then the watch's own
 * advice. Reminders and escalations say how long the alert has been open and that nobody acknowledged it. An
 * all-clear never repeats the raise's advice: it gives the watch's {@code clear message}, or says what ended,
 * after how long, and the value now. Durations count from the episode's start (the event's {@code since}, as
 * {@code byre status} shows it). Every text ends with the incident id and, when {@link AckLinks} has one,
 * the link that acknowledges it.
 */
public final class EventText {
    private final String site;
    private final boolean us;
    private final AckLinks links;

    /** @param us show temperatures in F and speeds in mph (configuration {@code units: us}) */
    public EventText(String site, boolean us, AckLinks links) {
        this.site = site == null || site.isBlank() ? "byre" : site;
        this.us = us;
        this.links = links == null ? AckLinks.NONE : links;
    }

    /** Metric units, no acknowledgement links. */
    public static EventText metric(String site) {
        return new EventText(site, false, AckLinks.NONE);
    }

    /** The same wording with other acknowledgement links. */
    public EventText withLinks(AckLinks other) {
        return new EventText(site, us, other);
    }

    public String site() {
        return site;
    }

    // ---- the events of an incident ----

    /** {@code ALERT at larkmoor, cow-shed: heat-danger (critical), THI 83.7, danger band. <advice> Incident …} */
    String raised(Incident inc) {
        StringBuilder sb = new StringBuilder("ALERT at ").append(where(inc.zone)).append(": ").append(what(inc));
        reading(sb, ", ", inc.quantity, inc.value, "", "");
        return advice(sb, inc.message).append(ackLine(inc.id)).toString();
    }

    /** {@code Reminder at …: heat-danger (critical) open 2 h, not acknowledged; THI 83.7, danger band when raised. <advice> Incident …} */
    String reminder(Incident inc, Duration open) {
        return stillOpen("Reminder", inc, open);
    }

    /** As a reminder, to the escalation channels. */
    String escalated(Incident inc, Duration open) {
        return stillOpen("ESCALATED", inc, open);
    }

    private String stillOpen(String word, Incident inc, Duration open) {
        StringBuilder sb = new StringBuilder(word).append(" at ").append(where(inc.zone)).append(": ").append(what(inc))
                .append(" open ").append(duration(open)).append(", not acknowledged");
        reading(sb, "; ", inc.quantity, inc.value, "", " when raised");
        return advice(sb, inc.message).append(ackLine(inc.id)).toString();
    }

    /**
     * {@code All clear at …: heat-danger ended after 2 h 5 min; THI now 76.9, alert band. Incident i1.}, or with the
     * watch's own clear message: {@code All clear at … (heat-danger, 2 h 5 min): <clear message> Incident i1.}
     */
    String cleared(Incident inc, double valueNow, String clearMessage, Duration lasted) {
        StringBuilder sb = new StringBuilder("All clear at ").append(where(inc.zone));
        if (clearMessage != null && !clearMessage.isBlank()) {
            sb.append(" (").append(inc.watch).append(", ").append(duration(lasted)).append("): ").append(sentence(clearMessage));
        } else {
            sb.append(": ").append(inc.watch).append(" ended after ").append(duration(lasted));
            if (Double.isFinite(valueNow)) reading(sb, "; ", inc.quantity, valueNow, " now", "");
            sb.append('.');
        }
        return sb.append(" Incident ").append(inc.id).append('.').toString();
    }

    /** {@code Acknowledged by sam at …: heat-danger (critical), open 42 min; no more reminders or escalation. Incident i1.} */
    String acknowledged(Incident inc, String by, Duration open) {
        return "Acknowledged by " + by + " at " + where(inc.zone) + ": " + what(inc) + ", open " + duration(open)
                + "; no more reminders or escalation. Incident " + inc.id + ".";
    }

    /** The answer {@code byre ack} prints: {@code acknowledged: heat-danger in cow-shed, open 42 min}. */
    static String ackSentence(Incident inc, Duration open) {
        return "acknowledged: " + inc.watch + (inc.zone == null || inc.zone.isEmpty() ? "" : " in " + inc.zone) + ", open " + duration(open);
    }

    // ---- events outside an incident ----

    /** The text of {@code byre notify-test}. */
    public String test(String channel, String incident) {
        return "Test at " + site + ": if you can read this, channel " + channel + " works. Incident " + incident + ".";
    }

    /** A {@code summary}: the events a channel's rate limit held back, each in a few words with its incident. */
    public String summary(String channel, List<AlertEvent> heldBack, int total) {
        StringBuilder sb = new StringBuilder("Held back at ").append(site).append(": ").append(total)
                .append(total == 1 ? " message" : " messages").append(" over the rate limit of ").append(channel);
        for (int i = 0; i < heldBack.size(); i++) {
            AlertEvent e = heldBack.get(i);
            sb.append(i == 0 ? ": " : "; ").append(e.headline());
            if (e.incident() != null) sb.append(" (incident ").append(e.incident()).append(')');
        }
        if (total > heldBack.size()) sb.append("; and ").append(total - heldBack.size()).append(" more");
        return sb.append('.').toString();
    }

    /** The morning digest (several lines). */
    public String digest(NightDigest night, ZoneId zone) {
        return DigestBuilder.render(site, night, zone);
    }

    // ---- values, bands, durations ----

    /**
     * A value for people: {@code THI 83.7, danger band}, {@code dry-bulb 8.2 C} (one decimal, site units);
     * an unknown quantity shows its id and the number as given.
     */
    public String reading(String quantity, double canonical) {
        StringBuilder sb = new StringBuilder();
        reading(sb, "", quantity, canonical, "", "");
        return sb.toString();
    }

    /** Appends {@code sep}, the quantity (with {@code now}: "THI now"), its value and band, and {@code suffix}; nothing without a quantity. */
    private void reading(StringBuilder sb, String sep, String quantity, double canonical, String now, String suffix) {
        if (quantity == null) return;
        sb.append(sep).append(label(quantity)).append(now);
        if (!Double.isFinite(canonical)) {
            sb.append(" unknown").append(suffix);
            return;
        }
        Optional<Quantity> q = Quantity.byId(quantity);
        Unit u = q.map(x -> MessageText.displayUnit(x, us)).orElse(Unit.NONE);
        sb.append(' ').append(MessageText.value(canonical, u));
        if (!u.symbol().isEmpty()) sb.append(' ').append(u.symbol());
        String band = q.map(x -> band(x, canonical)).orElse(null);
        if (band != null) sb.append(", ").append(band);
        sb.append(suffix);
    }

    /**
     * The published category of a value, in words that read as a band ("danger band"), or null when the
     * quantity has none. THI: the Livestock Weather Safety Index (LCI 1970), judged on the value as shown
     * (one decimal), so "THI 84.0" never reads "danger".
     */
    public static String band(Quantity q, double canonical) {
        if (q != Quantity.THI || !Double.isFinite(canonical)) return null;
        return ThiScale.LWSI.category(Math.round(canonical * 10) / 10.0) + " band";
    }

    /** How quantities are named in texts: indices in capitals (THI, CCI, BGHI, RH, VPD), the rest by their id. */
    public static String label(String quantity) {
        return switch (quantity) {
            case "thi", "cci", "bghi", "rh", "vpd" -> quantity.toUpperCase(Locale.ROOT);
            default -> quantity;
        };
    }

    /** "45 s", "42 min", "2 h 5 min", "3 d 4 h": how long, for people. */
    public static String duration(Duration d) {
        long s = Math.max(0, d.getSeconds());
        if (s < 60) return s + " s";
        long min = s / 60;
        long days = min / 1440;
        long hours = (min % 1440) / 60;
        long mins = min % 60;
        if (days > 0) return days + " d" + (hours > 0 ? " " + hours + " h" : "");
        if (hours > 0) return hours + " h" + (mins > 0 ? " " + mins + " min" : "");
        return mins + " min";
    }

    /**
     * Decimals that carry meaning for a quantity's canonical value (sensor resolution, common practice): one for
     * temperatures, RH and indices; two for air speed, pressure and humidity ratio; three for VPD; none for solar.
     */
    public static int decimals(Quantity q) {
        return switch (q) {
            case AIR_SPEED, PRESSURE, HUMIDITY_RATIO -> 2;
            case VPD -> 3;
            case SOLAR, ONLINE -> 0;
            case DRY_BULB, WET_BULB, RH, DEW_POINT, GLOBE, ENTHALPY, THI, HEAT_INDEX, WIND_CHILL, CCI, BGHI -> 1;
        };
    }

    /** A canonical value rounded to {@link #decimals} for event JSON (unknown quantities keep one decimal). */
    public static double rounded(String quantity, double canonical) {
        if (!Double.isFinite(canonical)) return canonical;
        int d = quantity == null ? 1 : Quantity.byId(quantity).map(EventText::decimals).orElse(1);
        double r = java.math.BigDecimal.valueOf(canonical).setScale(d, java.math.RoundingMode.HALF_UP).doubleValue();
        return r == 0 ? 0.0 : r; // no "-0.0"
    }

    // ---- pieces ----

    private String where(String zone) {
        return zone == null || zone.isEmpty() ? site : site + ", " + zone;
    }

    private static String what(Incident inc) {
        return inc.watch + (inc.level == null ? "" : " (" + inc.level + ")");
    }

    private static StringBuilder advice(StringBuilder sb, String advice) {
        sb.append('.');
        if (advice != null && !advice.isBlank()) sb.append(' ').append(sentence(advice));
        return sb;
    }

    /** Text that ends like a sentence, so the incident line that follows reads apart from it. */
    private static String sentence(String s) {
        String t = s.strip();
        char last = t.charAt(t.length() - 1);
        return last == '.' || last == '!' || last == '?' ? t : t + ".";
    }

    private String ackLine(String incident) {
        Optional<String> link = links.linkFor(incident);
        return " Incident " + incident + "; acknowledge: " + link.orElse("byre ack " + incident) + (link.isPresent() ? "" : ".");
    }
}
