package byre.cli;

import byre.config.Durations;
import java.time.Duration;
import java.time.Instant;
import java.time.LocalDate;
import java.time.LocalDateTime;
import java.time.OffsetDateTime;
import java.time.ZoneId;
import java.time.format.DateTimeParseException;
import java.util.Optional;

/**
 * Times on the command line: {@code now}; relative {@code -24h}, {@code -7d}, {@code -90m}; ISO 8601 with offset
 * ({@code 2026-07-14T13:05:00Z}, {@code 2026-07-14T14:05+01:00}); or local to the site's time zone
 * ({@code 2026-07-14T14:05}, {@code 2026-07-14} for its midnight).
 */
final class TimeArg {
    private TimeArg() {}

    static Optional<Instant> parse(String text, Instant now, ZoneId zone) {
        String t = text.strip();
        if (t.equalsIgnoreCase("now")) return Optional.of(now);
        if (t.startsWith("-")) return Durations.parse(t.substring(1)).map(now::minus);
        if (t.startsWith("+")) return Durations.parse(t.substring(1)).map(now::plus);
        try {
            return Optional.of(OffsetDateTime.parse(t).toInstant());
        } catch (DateTimeParseException ignored) {
            // next form
        }
        try {
            return Optional.of(Instant.parse(t));
        } catch (DateTimeParseException ignored) {
            // next form
        }
        try {
            return Optional.of(LocalDateTime.parse(t).atZone(zone).toInstant());
        } catch (DateTimeParseException ignored) {
            // next form
        }
        try {
            return Optional.of(LocalDate.parse(t).atStartOfDay(zone).toInstant());
        } catch (DateTimeParseException e) {
            return Optional.empty();
        }
    }

    static String help() {
        return "use now, -24h, -7d, 2026-07-14, 2026-07-14T14:05 (site time) or 2026-07-14T13:05:00Z";
    }

    static Duration positive(String text) {
        return Durations.parse(text).filter(d -> !d.isZero() && !d.isNegative()).orElse(null);
    }
}
