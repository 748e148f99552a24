package byre.config;

/**
 * Connection to the broker. {@code broker} is {@code embedded} or a URI ({@code tcp://}, {@code ssl://}).
 * {@code listenHost}/{@code listenPort} are used only by the embedded broker. {@code publishEvents} sends every
 * alert event to {@code <prefix>/<site>/events}; {@code publishEvery} paces the retained zone streams.
 * {@code acceptAcks}: whether acknowledgements published to {@code <prefix>/<site>/ack} are taken (off unless the
 * configuration says so).
 */
public record MqttSettings(String broker, String listenHost, int listenPort, String clientId, String username,
                           Secret password, String publishPrefix, int qos, String caFile, boolean publishEvents,
                           java.time.Duration publishEvery, boolean acceptAcks) {
    /** Zone streams are republished at most this often unless configured. */
    public static final java.time.Duration DEFAULT_PUBLISH_EVERY = java.time.Duration.ofSeconds(1);

    /** Defaults for what byre publishes: every event, zone streams at most once a second; no acknowledgements taken. */
    public MqttSettings(String broker, String listenHost, int listenPort, String clientId, String username,
                        Secret password, String publishPrefix, int qos, String caFile) {
        this(broker, listenHost, listenPort, clientId, username, password, publishPrefix, qos, caFile, true, DEFAULT_PUBLISH_EVERY, false);
    }

    /** As configured, acknowledgements over MQTT off. */
    public MqttSettings(String broker, String listenHost, int listenPort, String clientId, String username,
                        Secret password, String publishPrefix, int qos, String caFile, boolean publishEvents,
                        java.time.Duration publishEvery) {
        this(broker, listenHost, listenPort, clientId, username, password, publishPrefix, qos, caFile, publishEvents, publishEvery, false);
    }

    /**
     * Why taking acknowledgements over MQTT is unsafe with these settings, or null: a broker that lets clients in
     * without a password (the embedded one always does; a broker byre itself reaches without a user name does too)
     * lets anyone who can reach it silence every alert.
     */
    public String openAckWarning() {
        if (!acceptAcks) return null;
        if (embedded()) {
            return "mqtt.accept-acks is on with the embedded broker, which lets any program on this machine connect without a "
                    + "password and acknowledge (silence) alerts; use the barn's mosquitto with users (see Security in the README)";
        }
        if (username == null) {
            return "mqtt.accept-acks is on and byre reaches " + broker + " without a user name, so that broker lets anyone who "
                    + "reaches it acknowledge (silence) alerts; give byre a user and let only the operators publish to the ack topic";
        }
        return null;
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
                publishEvents, publishEvery, acceptAcks);
    }
}
