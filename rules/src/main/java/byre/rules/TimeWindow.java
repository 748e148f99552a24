package byre.rules;

import java.time.LocalTime;

/**
 * {@code only between start and end} in site wall-clock time; start inclusive, end exclusive.
 * A window with start after end wraps midnight (18:00..08:00).
 */
public record TimeWindow(LocalTime start, LocalTime end) {
    public boolean contains(LocalTime t) {
        return contains(t.getHour() * 60 + t.getMinute());
    }

    /** minuteOfDay in 0..1439. */
    public boolean contains(int minuteOfDay) {
        int s = start.getHour() * 60 + start.getMinute();
        int e = end.getHour() * 60 + end.getMinute();
        return s < e ? minuteOfDay >= s && minuteOfDay < e : minuteOfDay >= s || minuteOfDay < e;
    }

    @Override
    public String toString() { return start + " and " + end; }
}
