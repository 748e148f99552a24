package byre.config;

import java.util.Optional;
import org.snakeyaml.engine.v2.exceptions.Mark;

/**
 * One problem in a configuration file, shown as {@code file:line:col: message} like a rule file's diagnostics
 * (line and column from 1), or {@code file: message} when it has no place in the file ({@code line} 0).
 */
public record ConfigProblem(String file, int line, int column, String message) {
    /** A problem with the file as a whole, such as one that cannot be read. */
    static ConfigProblem ofFile(String file, String message) {
        return new ConfigProblem(file, 0, 0, message);
    }

    /** A problem at a parser mark (SnakeYAML counts lines and columns from 0); without a mark, at the file. */
    static ConfigProblem at(String file, Optional<Mark> mark, String message) {
        return mark.map(m -> new ConfigProblem(file, m.getLine() + 1, m.getColumn() + 1, message))
                .orElseGet(() -> ofFile(file, message));
    }

    @Override
    public String toString() {
        return line > 0 ? file + ":" + line + ":" + column + ": " + message : file + ": " + message;
    }
}
