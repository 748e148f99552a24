package byre.config;

/**
 * How a sensor's MQTT payload holds its value: a plain number, a field of a JSON object
 * ({@code json:<dotted.path>}), or a record of a SenML pack ({@code senml:<name>}, RFC 8428).
 */
public record PayloadFormat(Kind kind, String selector) {
    public enum Kind { NUMBER, JSON, SENML }

    public static final PayloadFormat NUMBER = new PayloadFormat(Kind.NUMBER, "");

    @Override
    public String toString() {
        return kind == Kind.NUMBER ? "number" : kind.name().toLowerCase() + ":" + selector;
    }
}
