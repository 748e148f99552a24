package byre.history;

/** The lowest and highest of a run of values such as a trend's hourly means; cells without data (NaN) are skipped. */
public record Extent(double lo, double hi) {

    public static Extent of(double[] values) {
        double lo = Double.POSITIVE_INFINITY;
        double hi = Double.NEGATIVE_INFINITY;
        for (double v : values) {
            if (Double.isNaN(v)) continue;
            lo = Math.min(lo, v);
            hi = Math.max(hi, v);
        }
        return new Extent(lo, hi);
    }

    /** No value had data. */
    public boolean empty() {
        return lo > hi;
    }
}
