package byre.units;

import java.util.Collection;
import java.util.Optional;

/** Did-you-mean: the closest known name within a small edit distance. */
public final class Suggest {
    private Suggest() {}

    /** The largest edit distance ever accepted as a suggestion. */
    static final int MAX_DISTANCE = 3;

    public static Optional<String> closest(String wrong, Collection<String> known) {
        String w = wrong.toLowerCase();
        int allowed = Math.max(1, Math.min(MAX_DISTANCE, wrong.length() / 3));
        String best = null;
        int bestDistance = Integer.MAX_VALUE;
        for (String candidate : known) {
            // The distance is at least the difference in length: a candidate that cannot come within
            // the allowed distance is not measured, so a huge word costs a length comparison per name.
            if (Math.abs(w.length() - candidate.length()) > allowed) continue;
            int d = distance(w, candidate.toLowerCase(), allowed);
            if (d < bestDistance) {
                bestDistance = d;
                best = candidate;
            }
        }
        if (best != null && bestDistance <= allowed) return Optional.of(best);
        // A known name the user wrote out longhand ("Fahr" for "F", "calves-all" for "calves").
        String prefix = null;
        for (String candidate : known) {
            if (!candidate.isEmpty() && w.startsWith(candidate.toLowerCase())
                    && (prefix == null || candidate.length() > prefix.length())) {
                prefix = candidate;
            }
        }
        return Optional.ofNullable(prefix);
    }

    /** " (did you mean 'x'?)" or "". */
    public static String hint(String wrong, Collection<String> known) {
        return closest(wrong, known).map(s -> " (did you mean '" + s + "'?)").orElse("");
    }

    /** Optimal string alignment distance: insertions, deletions, substitutions, adjacent swaps. */
    static int distance(String a, String b) {
        return distance(a, b, Integer.MAX_VALUE - 1);
    }

    /**
     * The optimal string alignment distance when it is at most {@code limit}, else {@code limit + 1}.
     * Only cells within {@code limit} of the diagonal can hold a distance within the limit, so only that
     * band is computed, in three rows: the work is about (2 limit + 1) times the length, the memory the length.
     */
    static int distance(String a, String b, int limit) {
        int n = a.length();
        int m = b.length();
        if (Math.abs(n - m) > limit) return limit + 1;
        int over = limit + 1;
        int[] prev2 = new int[m + 1];
        int[] prev = new int[m + 1];
        int[] cur = new int[m + 1];
        for (int j = 0; j <= m; j++) prev[j] = Math.min(j, over);
        for (int i = 1; i <= n; i++) {
            int from = (int) Math.max(1, (long) i - limit);
            int to = (int) Math.min(m, (long) i + limit);
            cur[0] = Math.min(i, over);
            if (from > 1) cur[from - 1] = over;
            int rowMin = cur[0];
            for (int j = from; j <= to; j++) {
                int cost = a.charAt(i - 1) == b.charAt(j - 1) ? 0 : 1;
                int up = j <= (long) i - 1 + limit ? prev[j] : over;
                int v = Math.min(Math.min(up + 1, cur[j - 1] + 1), prev[j - 1] + cost);
                if (i > 1 && j > 1 && a.charAt(i - 1) == b.charAt(j - 2) && a.charAt(i - 2) == b.charAt(j - 1)) {
                    v = Math.min(v, prev2[j - 2] + 1);
                }
                cur[j] = Math.min(v, over);
                rowMin = Math.min(rowMin, cur[j]);
            }
            if (to < m) cur[to + 1] = over;
            if (rowMin > limit) return over;
            int[] t = prev2;
            prev2 = prev;
            prev = cur;
            cur = t;
        }
        return Math.min(prev[m], over);
    }
}
