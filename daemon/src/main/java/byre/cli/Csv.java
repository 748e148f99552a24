package byre.cli;

/** RFC 4180 fields: quoted only when they hold a comma, a quote or a line break; quotes are doubled. Lines end in CRLF. */
final class Csv {
    static final String EOL = "\r\n";

    private Csv() {}

    static String field(String s) {
        if (s.indexOf(',') < 0 && s.indexOf('"') < 0 && s.indexOf('\n') < 0 && s.indexOf('\r') < 0) return s;
        return '"' + s.replace("\"", "\"\"") + '"';
    }

    static String row(String... fields) {
        StringBuilder sb = new StringBuilder();
        for (int i = 0; i < fields.length; i++) {
            if (i > 0) sb.append(',');
            sb.append(field(fields[i]));
        }
        return sb.append(EOL).toString();
    }
}
