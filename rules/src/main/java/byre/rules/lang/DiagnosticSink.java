package byre.rules.lang;

import byre.rules.Diagnostic;
import byre.rules.Diagnostic.Severity;
import java.util.ArrayList;
import java.util.List;

/** Collects the diagnostics of one file, with excerpts of the source lines; stops at a cap. */
public final class DiagnosticSink {
    public static final int MAX_PER_FILE = 100;
    private static final int EXCERPT = 160;

    private final String file;
    private final String text;
    private final int[] lineStarts;
    private final List<Diagnostic> list = new ArrayList<>();
    private int errors;
    private boolean capped;

    public DiagnosticSink(String file, String text) {
        this.file = file;
        this.text = text;
        int n = 1;
        for (int i = 0; i < text.length(); i++) if (text.charAt(i) == '\n') n++;
        lineStarts = new int[n];
        int k = 1;
        for (int i = 0; i < text.length(); i++) if (text.charAt(i) == '\n') lineStarts[k++] = i + 1;
    }

    public String file() { return file; }

    public void error(Pos p, String message) { add(Severity.ERROR, p, message); }

    public void warning(Pos p, String message) { add(Severity.WARNING, p, message); }

    public boolean hasErrors() { return errors > 0; }

    public List<Diagnostic> diagnostics() { return list; }

    private void add(Severity s, Pos p, String message) {
        if (capped) return;
        if (s == Severity.ERROR) errors++;
        if (list.size() >= MAX_PER_FILE) {
            capped = true;
            list.add(make(Severity.ERROR, p, "too many problems; stopping after " + MAX_PER_FILE + " in this file"));
            return;
        }
        list.add(make(s, p, LONG_NAME.matcher(message).replaceAll(m -> java.util.regex.Matcher.quoteReplacement("'" + m.group(1).substring(0, 40) + "...'"))));
    }

    /** A quoted name over 40 characters (a 1 MB word) is cut in messages; the excerpt shows where it is. */
    private static final java.util.regex.Pattern LONG_NAME = java.util.regex.Pattern.compile("'([^'\\s]{41,})'");

    private Diagnostic make(Severity s, Pos p, String message) {
        int line = Math.max(1, Math.min(p.line(), lineStarts.length));
        int start = lineStarts[line - 1];
        int end = text.indexOf('\n', start);
        if (end < 0) end = text.length();
        if (end > start && text.charAt(end - 1) == '\r') end--;
        int c = Math.max(0, Math.min(p.col() - 1, end - start));
        int from = 0;
        int to = end - start;
        if (to > EXCERPT) {
            from = Math.max(0, c - EXCERPT / 2);
            to = Math.min(end - start, from + EXCERPT);
        }
        StringBuilder ex = new StringBuilder();
        if (from > 0) ex.append("...");
        int caret = ex.length() + (c - from);
        for (int i = start + from; i < start + to; i++) {
            char ch = text.charAt(i);
            ex.append(ch == '\t' || (ch >= ' ' && ch != 0x7f && ch != '\uFFFD') ? ch : '?');
        }
        if (to < end - start) ex.append("...");
        return new Diagnostic(s, file, line, c + 1, Math.max(1, p.len()), message, ex.toString(), caret);
    }
}
