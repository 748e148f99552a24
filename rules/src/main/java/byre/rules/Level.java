package byre.rules;

import java.util.Arrays;
import java.util.List;
import java.util.Optional;

/** How urgent a watch is, as written after {@code level}. */
public enum Level {
    INFO, WARNING, CRITICAL;

    /** The word users write and events carry: {@code info}, {@code warning}, {@code critical}. */
    public String id() { return name().toLowerCase(); }

    public static Optional<Level> byId(String id) {
        return Arrays.stream(values()).filter(l -> l.id().equals(id)).findFirst();
    }

    public static List<String> ids() { return Arrays.stream(values()).map(Level::id).toList(); }

    @Override
    public String toString() { return id(); }
}
