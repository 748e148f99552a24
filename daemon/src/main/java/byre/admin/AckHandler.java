package byre.admin;

/** Acknowledges an open alert for {@code POST /ack}; the alert stage plugs one in. Called on an HTTP thread. */
@FunctionalInterface
public interface AckHandler {
    Result acknowledge(String incident, String by);

    /** What happened; {@code message} is shown to the operator. */
    record Result(Outcome outcome, String message) {
        public static Result acknowledged(String message) { return new Result(Outcome.ACKNOWLEDGED, message); }

        public static Result unknown(String message) { return new Result(Outcome.UNKNOWN_INCIDENT, message); }
    }

    enum Outcome {
        /** Acknowledged now (HTTP 200). */
        ACKNOWLEDGED,
        /** Already acknowledged earlier (HTTP 200, nothing changed). */
        ALREADY_ACKNOWLEDGED,
        /** No open incident with that id (HTTP 404). */
        UNKNOWN_INCIDENT,
        /** Could not be stored (HTTP 503). */
        FAILED
    }
}
