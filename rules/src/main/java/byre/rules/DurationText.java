package byre.rules;

import java.time.Duration;

/** Writes a duration the way rule files do: 90s -> 1m30s, 7200s -> 2h. */
public final class DurationText {
    private DurationText() {}

    public static String of(Duration d) {
        long s = d.getSeconds();
        if (s == 0) return d.toMillis() + "ms";
        StringBuilder sb = new StringBuilder();
        long[] units = {86_400, 3_600, 60, 1};
        String[] names = {"d", "h", "m", "s"};
        for (int i = 0; i < units.length; i++) {
            if (s >= units[i]) {
                sb.append(s / units[i]).append(names[i]);
                s %= units[i];
            }
        }
        return sb.toString();
    }
}
