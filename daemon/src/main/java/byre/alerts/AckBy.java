package byre.alerts;

/**
 * Cleans the text an acknowledgement carries ({@code by}, and the incident id as given) before it reaches a log
 * line, an event or the history: control and formatting characters (new lines, escape sequences, bidirectional
 * overrides) become spaces, runs of spaces become one, and the result is cut to a length. Every path (MQTT, admin
 * API, command line, and whatever else calls {@link IncidentBook#acknowledge}) uses it, so an acknowledgement
 * cannot forge a log line or an event.
 */
public final class AckBy {
    /** Longest name kept in {@code by}. */
    public static final int MAX_BY = 64;
    /** Longest incident id kept when echoed (ids byre makes are far shorter). */
    public static final int MAX_INCIDENT = 80;

    private AckBy() {}

    /** The cleaned {@code by}; {@code fallback} when nothing printable is left. */
    public static String clean(String raw, String fallback) {
        String s = oneLine(raw, MAX_BY);
        return s.isEmpty() ? fallback : s;
    }

    /** The cleaned incident id as given (empty when nothing printable is left). */
    public static String incident(String raw) {
        return oneLine(raw, MAX_INCIDENT);
    }

    /** One line of printable text, at most {@code max} characters (code points), spaces collapsed, stripped. */
    public static String oneLine(String raw, int max) {
        if (raw == null) return "";
        StringBuilder out = new StringBuilder(Math.min(raw.length(), max * 2));
        int kept = 0;
        boolean space = false;
        for (int i = 0; i < raw.length() && kept < max; ) {
            int cp = raw.codePointAt(i);
            i += Character.charCount(cp);
            if (unsafe(cp) || Character.isWhitespace(cp) || Character.isSpaceChar(cp)) {
                space = out.length() > 0;
                continue;
            }
            if (space) {
                if (kept + 1 >= max) break;
                out.append(' ');
                kept++;
                space = false;
            }
            out.appendCodePoint(cp);
            kept++;
        }
        return out.toString();
    }

    private static boolean unsafe(int cp) {
        return switch (Character.getType(cp)) {
            case Character.CONTROL, Character.FORMAT, Character.LINE_SEPARATOR, Character.PARAGRAPH_SEPARATOR,
                 Character.SURROGATE, Character.PRIVATE_USE, Character.UNASSIGNED -> true;
            default -> false;
        };
    }
}
