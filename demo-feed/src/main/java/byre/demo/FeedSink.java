package byre.demo;

/** Where the feed publisher sends its messages: an MQTT broker, or a list in a test. */
public interface FeedSink extends AutoCloseable {

    /** Sends one message; returns when the sink has taken it (for MQTT QoS 1: when the broker acknowledged it). */
    void publish(FeedMessage message) throws Exception;

    /** Releases connections and threads; called once, by the publisher's own thread or by stop(). */
    @Override
    void close();
}
