package byre.config;

/**
 * Connection to the broker. {@code broker} is {@code embedded} or a URI ({@code tcp://}, {@code ssl://}).
 * {@code listenHost}/{@code listenPort} are used only by the embedded broker.
 */
public record MqttSettings(String broker, String listenHost, int listenPort, String clientId, String username,
                           Secret password, String publishPrefix, int qos, String caFile) {
    public boolean embedded() {
        return "embedded".equals(broker);
    }

    /** The URI the daemon's client connects to. */
    public String connectUri() {
        return embedded() ? "tcp://" + listenHost + ":" + listenPort : broker;
    }

    public MqttSettings withBroker(String newBroker, int newListenPort) {
        return new MqttSettings(newBroker, listenHost, newListenPort, clientId, username, password, publishPrefix, qos, caFile);
    }
}
