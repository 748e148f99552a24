package byre.config;

/**
 * Connection to the broker. {@code broker} is {@code embedded} or a URI ({@code tcp://}, {@code ssl://}).
 * {@code listenHost}/{@code listenPort} are used only by the embedded broker. {@code publishEvents} sends every
 * alert event to {@code <prefix>/<site>/events}; {@code publishEvery} paces the retained zone streams.
 */
public record MqttSettings(String broker, String listenHost, int listenPort, String clientId, String username,
                           Secret password, String publishPrefix, int qos, String caFile, boolean publishEvents,
                           java.time.Duration publishEvery) {
    /** Zone streams are republished at most this often unless configured. */
    public static final java.time.Duration DEFAULT_PUBLISH_EVERY = java.time.Duration.ofSeconds(1);

    /** Defaults for what byre publishes: every event, zone streams at most once a second. */
    public MqttSettings(String broker, String listenHost, int listenPort, String clientId, String username,
                        Secret password, String publishPrefix, int qos, String caFile) {
        this(broker, listenHost, listenPort, clientId, username, password, publishPrefix, qos, caFile, true, DEFAULT_PUBLISH_EVERY);
    }

    public boolean embedded() {
        return "embedded".equals(broker);
    }

    /** The URI the daemon's client connects to. */
    public String connectUri() {
        return embedded() ? "tcp://" + listenHost + ":" + listenPort : broker;
    }

    public MqttSettings withBroker(String newBroker, int newListenPort) {
        return new MqttSettings(newBroker, listenHost, newListenPort, clientId, username, password, publishPrefix, qos, caFile,
                publishEvents, publishEvery);
    }
}
