package byre.alerts;

import java.time.Duration;
import java.util.List;

/**
 * Whom a watch tells and how hard it insists: {@code channels} at once, a reminder every
 * {@code remindEvery} (null: none), and {@code escalateTo} after {@code escalateAfter} (null: never),
 * both only while nobody has acknowledged.
 */
public record AlertPolicy(List<String> channels, Duration remindEvery, Duration escalateAfter, List<String> escalateTo) {
    public AlertPolicy {
        channels = channels == null ? List.of() : List.copyOf(channels);
        escalateTo = escalateTo == null ? List.of() : List.copyOf(escalateTo);
        if (remindEvery != null && (remindEvery.isNegative() || remindEvery.isZero())) remindEvery = null;
        if (escalateAfter != null && escalateAfter.isNegative()) escalateAfter = null;
    }

    public static AlertPolicy notifyOnly(List<String> channels) {
        return new AlertPolicy(channels, null, null, List.of());
    }
}
