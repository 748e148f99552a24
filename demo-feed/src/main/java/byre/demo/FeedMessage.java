package byre.demo;

import java.nio.charset.StandardCharsets;
import java.time.Instant;
import java.util.Arrays;
import java.util.Objects;

/**
 * One MQTT message of the simulated barn: where it goes, what it carries, and the simulated
 * instant at which the sensor sent it. Equality compares the payload bytes, so two runs can be
 * compared message by message.
 */
public record FeedMessage(String topic, byte[] payload, Instant simTime) {

    public FeedMessage {
        Objects.requireNonNull(topic, "topic");
        Objects.requireNonNull(payload, "payload");
        Objects.requireNonNull(simTime, "simTime");
        payload = payload.clone();
    }

    static FeedMessage text(String topic, String payload, Instant simTime) {
        return new FeedMessage(topic, payload.getBytes(StandardCharsets.UTF_8), simTime);
    }

    @Override
    public byte[] payload() { return payload.clone(); }

    /** The payload as UTF-8 text (every simulated payload is text). */
    public String payloadText() { return new String(payload, StandardCharsets.UTF_8); }

    @Override
    public boolean equals(Object o) {
        return o instanceof FeedMessage m && topic.equals(m.topic) && simTime.equals(m.simTime)
                && Arrays.equals(payload, m.payload);
    }

    @Override
    public int hashCode() { return Objects.hash(topic, simTime) * 31 + Arrays.hashCode(payload); }

    @Override
    public String toString() { return simTime + " " + topic + " " + payloadText(); }
}
