package byre.admin;

import byre.json.JsonWriter;
import java.util.List;

/** The verdict of {@link HealthMonitor}: healthy, or the list of what is not, in words an operator can act on. */
public record Health(boolean healthy, List<String> problems) {
    public Health {
        problems = List.copyOf(problems);
    }

    /** {@code {"healthy":false,"problems":["..."]}}. */
    public String toJson() {
        return new JsonWriter().field("healthy", healthy).field("problems", problems) + "\n";
    }
}
