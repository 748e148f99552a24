package byre.config;

/** A password or key read from a file or the environment; never printed. */
public final class Secret {
    private final String value;
    private final String origin;

    public Secret(String value, String origin) {
        this.value = value;
        this.origin = origin;
    }

    /** The secret itself: pass it only to the library that needs it. */
    public String reveal() {
        return value;
    }

    /** Where it came from (a file path or an environment variable name), safe to log. */
    public String origin() {
        return origin;
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof Secret other && other.value.equals(value) && other.origin.equals(origin);
    }

    @Override
    public int hashCode() {
        return origin.hashCode();
    }

    @Override
    public String toString() {
        return "<secret from " + origin + ">";
    }
}
