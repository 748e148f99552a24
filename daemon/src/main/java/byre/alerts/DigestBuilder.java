package byre.alerts;

import byre.json.JsonWriter;
import java.time.Duration;
import java.time.Instant;
import java.time.LocalDate;
import java.time.LocalTime;
import java.time.ZoneId;
import java.time.ZonedDateTime;
import java.time.format.DateTimeFormatter;
import java.util.List;
import java.util.Locale;
import java.util.Map;

/** Renders the morning digest as short plain text (the {@code digest} event's text, see {@link EventText}), and says when the next one is due. Pure. */
public final class DigestBuilder {
    private static final DateTimeFormatter HM = DateTimeFormatter.ofPattern("HH:mm", Locale.ROOT);

    private DigestBuilder() {}

    public static String render(String site, NightDigest n, ZoneId zone) {
        StringBuilder sb = new StringBuilder();
        sb.append("Night at ").append(site).append(", ").append(HM.format(n.from().atZone(zone))).append('-')
                .append(HM.format(n.to().atZone(zone))).append('\n');
        for (NightDigest.ZoneNight z : n.zones()) {
            sb.append('\n').append(z.zone()).append('\n');
            for (Map.Entry<String, double[]> e : z.extremes().entrySet()) {
                String unit = z.units().getOrDefault(e.getKey(), "");
                String u = unit.isEmpty() ? "" : " " + unit;
                sb.append("  ").append(EventText.label(e.getKey())).append(' ').append(num(e.getValue()[0])).append(u).append(" to ")
                        .append(num(e.getValue()[1])).append(u).append('\n');
            }
            if (!z.thiCategories().isEmpty()) {
                sb.append("  THI bands:");
                boolean first = true;
                for (Map.Entry<String, Duration> c : z.thiCategories().entrySet()) {
                    if (c.getValue().isZero()) continue;
                    sb.append(first ? " " : ", ").append(c.getKey()).append(' ').append(hours(c.getValue()));
                    first = false;
                }
                if (first) sb.append(" no data");
                sb.append('\n');
            }
        }
        sb.append('\n');
        if (n.incidents().isEmpty()) {
            sb.append("No alerts overnight.\n");
        } else {
            sb.append("Alerts (").append(n.incidents().size()).append("):\n");
            for (NightDigest.IncidentSpan i : n.incidents()) {
                sb.append("  ").append(i.watch()).append(' ').append(i.zone()).append(" (").append(i.level()).append(") ")
                        .append(HM.format(i.start().atZone(zone)));
                if (i.end() == null) sb.append(", still open");
                else sb.append('-').append(HM.format(i.end().atZone(zone))).append(", ").append(EventText.duration(Duration.between(i.start(), i.end())));
                sb.append('\n');
            }
        }
        if (!n.silentSensors().isEmpty()) sb.append("Silent sensors: ").append(String.join(", ", n.silentSensors())).append('\n');
        return sb.toString();
    }

    /** The digest as an event (kind {@code digest}) addressed to {@code channels}. */
    public static AlertEvent event(String id, String site, NightDigest n, ZoneId zone, List<String> channels) {
        return new AlertEvent(id, null, EventKind.DIGEST, site, "digest", null, null, null, Double.NaN, null, n.from(), n.to(),
                EventText.metric(site).digest(n, zone), null, List.of(), channels);
    }

    /**
     * The first instant strictly after {@code after} at which the site's clock shows {@code at}. On a day when
     * {@code at} falls in a daylight-saving gap, the digest goes at the first valid time after it.
     */
    public static Instant nextRun(Instant after, LocalTime at, ZoneId zone) {
        LocalDate day = after.atZone(zone).toLocalDate();
        for (int i = 0; i < 3; i++) {
            Instant t = ZonedDateTime.of(day.plusDays(i), at, zone).toInstant();
            if (t.isAfter(after)) return t;
        }
        throw new IllegalStateException("no next digest time after " + after);
    }

    /** One decimal, as in every alert text. */
    private static String num(double v) {
        return byre.rules.eval.MessageText.value(v, byre.units.Unit.NONE);
    }

    private static String hours(Duration d) {
        double h = d.toMinutes() / 60.0;
        return JsonWriter.format(Math.round(h * 10) / 10.0) + " h";
    }
}
