package byre.history;

import java.util.List;

/**
 * One numbered step of the history schema. Steps run in order, each in its own transaction together
 * with the {@code PRAGMA user_version} bump, so a crash leaves the file at the previous version.
 */
public record Migration(int version, String description, List<String> statements) {
    public Migration {
        if (version < 1) throw new IllegalArgumentException("migration versions start at 1, got " + version);
        statements = List.copyOf(statements);
    }
}
