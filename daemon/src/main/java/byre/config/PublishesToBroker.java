package byre.config;

/** Settings of a channel kind that publishes on byre's own broker connection: the broker's access list must let byre write there. */
public interface PublishesToBroker {
    String brokerTopic();
}
