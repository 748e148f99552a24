package byre.rules;

/**
 * One problem in a rule file. {@link #render()} gives {@code file:line:col: message}, the source line
 * and a caret line under the problem. Very long lines are shown as an excerpt around the column.
 *
 * @param excerpt the part of the source line shown (control characters replaced by '?')
 * @param excerptColumn 0-based index of the caret inside {@code excerpt}
 */
public record Diagnostic(Severity severity, String file, int line, int column, int length, String message,
                         String excerpt, int excerptColumn) {

    public enum Severity { ERROR, WARNING }

    public boolean isError() { return severity == Severity.ERROR; }

    /** {@code file:line:col: message} (warnings read {@code file:line:col: warning: message}). */
    public String headline() {
        return file + ":" + line + ":" + column + ": " + (severity == Severity.WARNING ? "warning: " : "") + message;
    }

    /** The headline, the source line and the caret line, joined by '\n' (no trailing newline). */
    public String render() {
        StringBuilder sb = new StringBuilder(headline());
        if (excerpt != null) {
            sb.append('\n').append(excerpt).append('\n');
            for (int i = 0; i < excerptColumn && i < excerpt.length(); i++) {
                sb.append(excerpt.charAt(i) == '\t' ? '\t' : ' ');
            }
            sb.append('^');
            int tildes = Math.min(Math.max(length, 1), Math.max(1, excerpt.length() - excerptColumn)) - 1;
            for (int i = 0; i < tildes; i++) sb.append('~');
        }
        return sb.toString();
    }

    @Override
    public String toString() { return headline(); }
}
