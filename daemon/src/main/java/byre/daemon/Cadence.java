package byre.daemon;

import java.time.Duration;
import java.time.Instant;

/**
 * Lets a timed stage act at most once per interval of the pipeline's ticks, and tells the pipeline when it is next
 * due ({@link #nextAt}). A clock stepped back by more than {@code stepBack} counts as due at once, so that a corrected
 * clock does not silence the stage until the old time comes round again.
 */
final class Cadence {
    private final Duration every;
    private final Duration slack;
    private final Duration stepBack;
    private Instant next = Instant.MIN;

    Cadence(Duration every, Duration stepBack) {
        this(every, Duration.ZERO, stepBack);
    }

    /**
     * A stage that acts at least every {@code every} and at most every {@code every + slack}: any turn in that span
     * serves, so that it can ride along with the turns the readings cause ({@link #nextAt} names the span's end).
     */
    Cadence(Duration every, Duration slack, Duration stepBack) {
        this.every = every;
        this.slack = slack;
        this.stepBack = stepBack;
    }

    /** Whether a turn is due at {@code now}; if so, the next one is scheduled from now. */
    boolean due(Instant now) {
        if (now.isBefore(next) && !now.isBefore(next.minus(stepBack))) return false;
        restart(now);
        return true;
    }

    /**
     * The latest tick at which the stage must act, as of {@code now}: the scheduled turn plus the slack, or now when
     * that has passed or the clock stepped back far. {@link #due} says yes from the scheduled turn on.
     */
    Instant nextAt(Instant now) {
        if (now.isBefore(next) && now.isBefore(next.minus(stepBack))) return now;
        Instant latest = next.plus(slack);
        return now.isBefore(latest) ? latest : now;
    }

    /** Schedules the next turn one interval from {@code now} (after a turn taken for another reason). */
    void restart(Instant now) {
        next = now.plus(every);
    }
}
