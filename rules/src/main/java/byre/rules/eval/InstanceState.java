package byre.rules.eval;

import java.time.Instant;

/** A snapshot of one watch instance that is not clear, for status pages and retained MQTT state. */
public record InstanceState(String watch, String zone, AlertState state, Instant since, Instant raisedAt, double value) {
}
