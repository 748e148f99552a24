package byre.units;

import java.util.Collection;
import java.util.Optional;

/** Did-you-mean: the closest known name within a small edit distance. */
public final class Suggest {
    private Suggest() {}

    public static Optional<String> closest(String wrong, Collection<String> known) {
        String best = null;
        int bestDistance = Integer.MAX_VALUE;
        for (String candidate : known) {
            int d = distance(wrong.toLowerCase(), candidate.toLowerCase());
            if (d < bestDistance) {
                bestDistance = d;
                best = candidate;
            }
        }
        int allowed = Math.max(1, Math.min(3, wrong.length() / 3));
        if (best != null && bestDistance <= allowed) return Optional.of(best);
        // A known name the user wrote out longhand ("Fahr" for "F", "calves-all" for "calves").
        String prefix = null;
        for (String candidate : known) {
            if (!candidate.isEmpty() && wrong.toLowerCase().startsWith(candidate.toLowerCase())
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
        int[][] d = new int[a.length() + 1][b.length() + 1];
        for (int i = 0; i <= a.length(); i++) d[i][0] = i;
        for (int j = 0; j <= b.length(); j++) d[0][j] = j;
        for (int i = 1; i <= a.length(); i++) {
            for (int j = 1; j <= b.length(); j++) {
                int cost = a.charAt(i - 1) == b.charAt(j - 1) ? 0 : 1;
                d[i][j] = Math.min(Math.min(d[i - 1][j] + 1, d[i][j - 1] + 1), d[i - 1][j - 1] + cost);
                if (i > 1 && j > 1 && a.charAt(i - 1) == b.charAt(j - 2) && a.charAt(i - 2) == b.charAt(j - 1)) {
                    d[i][j] = Math.min(d[i][j], d[i - 2][j - 2] + 1);
                }
            }
        }
        return d[a.length()][b.length()];
    }
}
