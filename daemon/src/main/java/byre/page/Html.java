package byre.page;

/** Escaping for text and attribute values in HTML: every zone name, message and id goes through here. */
final class Html {
    private Html() {}

    /** Text safe inside an element or a double- or single-quoted attribute. */
    static String esc(String s) {
        if (s == null) return "";
        StringBuilder sb = null;
        for (int i = 0; i < s.length(); i++) {
            char c = s.charAt(i);
            String rep = switch (c) {
                case '&' -> "&amp;";
                case '<' -> "&lt;";
                case '>' -> "&gt;";
                case '"' -> "&quot;";
                case '\'' -> "&#39;";
                default -> null;
            };
            if (rep == null && (c < 0x20 && c != '\n' && c != '\t')) rep = "\uFFFD"; // control characters have no place on a page
            if (rep != null) {
                if (sb == null) sb = new StringBuilder(s.length() + 16).append(s, 0, i);
                sb.append(rep);
            } else if (sb != null) {
                sb.append(c);
            }
        }
        return sb == null ? s : sb.toString();
    }
}
