package byre.units;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.ArrayList;
import java.util.List;
import java.util.Optional;
import java.util.Random;
import org.junit.jupiter.api.Test;

class SuggestTest {
    private static final List<String> ZONES = List.of("calf-pen-1", "calf-pen-2", "calves", "cow-shed-north", "hutches");

    @Test
    void suggestsTheNearNameAndTheLonghandPrefix() {
        assertEquals(Optional.of("calf-pen-1"), Suggest.closest("calf-pne-1", ZONES));
        assertEquals(Optional.of("calves"), Suggest.closest("calves-all", ZONES));
        assertEquals(Optional.empty(), Suggest.closest("dairy", ZONES));
        assertEquals(" (did you mean 'hutches'?)", Suggest.hint("hutchse", ZONES));
    }

    @Test
    void aHugeWordGetsTheSameAnswerAsAShortOne() {
        String mib = "x".repeat(1 << 20);
        assertEquals(Optional.empty(), Suggest.closest(mib, ZONES));
        assertEquals(Optional.of("calves"), Suggest.closest("calves" + mib, ZONES));
    }

    @Test
    void twoHugeNamesAreComparedInABandNotAFullMatrix() {
        // The full matrix of two 1 MiB names would need 4 TiB: only the band near the diagonal is computed.
        String stem = "a".repeat(1 << 20);
        String known = stem + "north";
        assertEquals(Optional.of(known), Suggest.closest(stem + "nrth", List.of("calves", known)));
        assertEquals(Optional.empty(), Suggest.closest(stem + "east", List.of("calves", known)));
    }

    @Test
    void boundedDistanceAgreesWithTheFullOneOnRandomWords() {
        Random random = new Random(20261202);
        List<String> words = new ArrayList<>();
        for (int i = 0; i < 300; i++) {
            StringBuilder sb = new StringBuilder();
            int len = random.nextInt(9);
            for (int k = 0; k < len; k++) sb.append((char) ('a' + random.nextInt(3)));
            words.add(sb.toString());
        }
        for (int i = 0; i + 1 < words.size(); i++) {
            String a = words.get(i);
            String b = words.get(i + 1);
            int full = fullDistance(a, b);
            for (int limit = 0; limit <= 4; limit++) {
                assertEquals(Math.min(full, limit + 1), Suggest.distance(a, b, limit), a + " / " + b + " limit " + limit);
            }
            assertEquals(full, Suggest.distance(a, b), a + " / " + b);
        }
    }

    @Test
    void distanceCountsSwapsAsOneEdit() {
        // Optimal string alignment: "ca" -> "abc" is 3 (no edit of a swapped pair), "abcd" -> "acbd" is 1.
        assertEquals(1, Suggest.distance("abcd", "acbd"));
        assertEquals(3, Suggest.distance("ca", "abc"));
        assertEquals(3, Suggest.distance("kitten", "sitting"));
    }

    /** The textbook full-matrix optimal string alignment distance, as the reference. */
    private static int fullDistance(String a, String b) {
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
