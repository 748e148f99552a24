package byre.config;

/**
 * The admin HTTP listener (metrics, health, status, acknowledgement); port 0 disables it. A token file
 * that cannot be read does not stop byre (metrics and health matter more): {@code tokenProblem} says
 * why acknowledgement through the API is off.
 */
public record AdminSettings(String host, int port, Secret token, String tokenProblem) {
    public AdminSettings(String host, int port, Secret token) {
        this(host, port, token, null);
    }

    public boolean enabled() {
        return port > 0;
    }
}
