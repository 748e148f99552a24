package byre.config;

/** One problem in a configuration file, shown as {@code file:line: message}. */
public record ConfigProblem(String file, int line, String message) {
    @Override
    public String toString() {
        return line > 0 ? file + ":" + line + ": " + message : file + ": " + message;
    }
}
