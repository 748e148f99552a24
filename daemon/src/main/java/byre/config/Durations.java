package byre.config;

import java.time.Duration;
import java.util.Optional;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/** Durations as users write them: {@code 30s 20m 2h 1d 2w 5y} (a year is 365 days). */
public final class Durations {
    private static final Pattern FORM = Pattern.compile("\\s*(\\d+)\\s*(ms|s|m|h|d|w|y)\\s*");

    private Durations() {}

    public static Optional<Duration> parse(String text) {
        Matcher m = FORM.matcher(text);
        if (!m.matches()) return Optional.empty();
        long n;
        try {
            n = Long.parseLong(m.group(1));
        } catch (NumberFormatException e) {
            return Optional.empty();
        }
        switch (m.group(2)) {
            case "ms": return Optional.of(Duration.ofMillis(n));
            case "s": return Optional.of(Duration.ofSeconds(n));
            case "m": return Optional.of(Duration.ofMinutes(n));
            case "h": return Optional.of(Duration.ofHours(n));
            case "d": return Optional.of(Duration.ofDays(n));
            case "w": return Optional.of(Duration.ofDays(7 * n));
            default: return Optional.of(Duration.ofDays(365 * n));
        }
    }

    /** The shortest exact way to write a duration back: 90s -> "90s", 7200s -> "2h". */
    public static String format(Duration d) {
        long s = d.getSeconds();
        if (s != 0 && s % 86400 == 0) return s / 86400 + "d";
        if (s != 0 && s % 3600 == 0) return s / 3600 + "h";
        if (s != 0 && s % 60 == 0) return s / 60 + "m";
        return s + "s";
    }
}
