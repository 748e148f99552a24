package byre.config;

/** The admin HTTP listener (metrics, health, status, acknowledgement); port 0 disables it. */
public record AdminSettings(String host, int port, Secret token) {
    public boolean enabled() {
        return port > 0;
    }
}
