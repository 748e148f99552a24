package byre.daemon;

import java.time.Duration;
import java.time.Instant;

/**
 * Lets a timed stage act at most once per interval of the pipeline's ticks (which come four times a second).
 * A clock stepped back by more than {@code stepBack} counts as due at once, so that a corrected clock does
 * not silence the stage until the old time comes round again.
 */
final class Cadence {
    private final Duration every;
    private final Duration stepBack;
    private Instant next = Instant.MIN;

    Cadence(Duration every, Duration stepBack) {
        this.every = every;
        this.stepBack = stepBack;
    }

    /** Whether a turn is due at {@code now}; if so, the next one is scheduled from now. */
    boolean due(Instant now) {
        if (now.isBefore(next) && !now.isBefore(next.minus(stepBack))) return false;
        restart(now);
        return true;
    }

    /** Schedules the next turn one interval from {@code now} (after a turn taken for another reason). */
    void restart(Instant now) {
        next = now.plus(every);
    }
}
