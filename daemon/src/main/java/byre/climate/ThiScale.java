package byre.climate;

import java.util.List;

/**
 * THI category tables, kept as data with their sources. A THI falls in the last band whose lower
 * bound it reaches. These are guides to adapt with the herd's veterinarian, not verdicts.
 */
public enum ThiScale {
    /**
     * Livestock Weather Safety Index (Livestock Conservation Institute 1970), bands as given by
     * Harrington and Bowles 2002 (AMS) and the agroclimatico documentation: normal below 75,
     * alert 75-78, danger 79-83, emergency 84 and above.
     */
    LWSI("lwsi", "Livestock Weather Safety Index (LCI 1970)",
            List.of(new Band(Double.NEGATIVE_INFINITY, "normal"), new Band(75, "alert"),
                    new Band(79, "danger"), new Band(84, "emergency"))),
    /**
     * Dairy cows, Zimbelman et al. 2009 (Proc. Southwest Nutrition and Management Conf.) and the
     * revised chart of Zimbelman and Collier (Hoard's Dairyman): heat stress begins at 68 for
     * high-producing cows, mild-moderate 72-79, moderate-severe 80-89, severe 90 and above.
     */
    DAIRY("dairy", "dairy cows, Zimbelman et al. 2009",
            List.of(new Band(Double.NEGATIVE_INFINITY, "no stress"), new Band(68, "stress threshold"),
                    new Band(72, "mild-moderate"), new Band(80, "moderate-severe"), new Band(90, "severe")));

    /** A band starting at {@code from} (inclusive). */
    public record Band(double from, String name) {}

    private final String id;
    private final String source;
    private final List<Band> bands;

    ThiScale(String id, String source, List<Band> bands) {
        this.id = id;
        this.source = source;
        this.bands = bands;
    }

    public String id() { return id; }

    public String source() { return source; }

    public List<Band> bands() { return bands; }

    /** Category name for a THI value, or null for NaN. */
    public String category(double thi) {
        if (Double.isNaN(thi)) return null;
        String name = bands.get(0).name();
        for (Band b : bands) if (thi >= b.from()) name = b.name();
        return name;
    }
}
