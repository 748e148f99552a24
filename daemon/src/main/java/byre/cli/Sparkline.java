package byre.cli;

/** Draws a series as one line of Unicode block characters, lowest value ▁, highest █; a gap (NaN) is a space. */
final class Sparkline {
    static final String BLOCKS = "▁▂▃▄▅▆▇█";

    private Sparkline() {}

    static String draw(double[] values) {
        byre.history.Extent extent = byre.history.Extent.of(values);
        double lo = extent.lo();
        double hi = extent.hi();
        StringBuilder sb = new StringBuilder(values.length);
        for (double v : values) {
            if (Double.isNaN(v)) {
                sb.append(' ');
            } else if (hi - lo < 1e-9) {
                sb.append(BLOCKS.charAt(3)); // a flat line sits mid-height
            } else {
                int i = (int) Math.round((v - lo) / (hi - lo) * (BLOCKS.length() - 1));
                sb.append(BLOCKS.charAt(i));
            }
        }
        return sb.toString();
    }
}
