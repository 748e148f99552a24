package byre.demo;

import java.time.Instant;
import java.util.List;

/** Something that yields MQTT messages in simulated-time order, one batch per step. */
public interface FeedSource {

    /** Simulated instant at which the next batch starts. */
    Instant simTime();

    /** The messages of the next step, in time order (may be empty); advances {@link #simTime()}. */
    List<FeedMessage> step();
}
