package byre.demo;

/**
 * One simulated sensor, described in the words of the byre configuration (README, Configuration):
 * its id under {@code sensors:}, the zone that lists it, its topic, quantity, unit symbol and
 * payload form ({@code number}, {@code json:<path>} or {@code senml:<name>}).
 */
public record SimSensor(String id, String zone, String topic, String quantity, String unit, String payload) {

    /** The sensor's line under {@code sensors:} in a byre configuration. */
    public String yamlLine() {
        StringBuilder b = new StringBuilder();
        b.append(id).append(": { topic: ").append(topic).append(", quantity: ").append(quantity)
                .append(", unit: ").append(unit.equals("%") ? "\"%\"" : unit);
        if (!payload.equals("number")) b.append(", payload: \"").append(payload).append('"');
        return b.append(" }").toString();
    }
}
