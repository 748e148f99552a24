package byre.history;

import java.time.Duration;

/**
 * How long each level of the history is kept (README, Configuration: {@code keep-raw}, {@code keep-minute},
 * {@code keep-hour}). Each must be positive; a finer level may not be kept longer than a coarser one,
 * because the coarser rollups are what remain when the finer rows are gone.
 */
public record Retention(Duration keepRaw, Duration keepMinute, Duration keepHour) {

    /** The defaults (README, Configuration): 14 days raw, 90 days of minutes, 5 years of hours. */
    public static final Retention DEFAULT = new Retention(Duration.ofDays(14), Duration.ofDays(90), Duration.ofDays(5 * 365 + 1));

    public Retention {
        check("keep-raw", keepRaw);
        check("keep-minute", keepMinute);
        check("keep-hour", keepHour);
        if (keepRaw.compareTo(keepMinute) > 0) {
            throw new IllegalArgumentException("history keep-raw (" + keepRaw + ") must not be longer than keep-minute (" + keepMinute + ")");
        }
        if (keepMinute.compareTo(keepHour) > 0) {
            throw new IllegalArgumentException("history keep-minute (" + keepMinute + ") must not be longer than keep-hour (" + keepHour + ")");
        }
    }

    private static void check(String name, Duration d) {
        if (d == null || d.isNegative() || d.isZero()) {
            throw new IllegalArgumentException("history " + name + " must be a positive duration, got " + d);
        }
    }
}
