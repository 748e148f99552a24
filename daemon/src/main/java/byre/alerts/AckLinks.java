package byre.alerts;

import java.util.Optional;

/**
 * Where a person can acknowledge an incident with one tap: a link that messages carry next to the incident id.
 * The daemon plugs in the signed links of its barn page; {@link #NONE} when no base address is configured.
 */
@FunctionalInterface
public interface AckLinks {
    /** The link for one open incident, or empty when there is none. */
    Optional<String> linkFor(String incidentId);

    /** No links: messages say how to acknowledge with {@code byre ack}. */
    AckLinks NONE = id -> Optional.empty();
}
