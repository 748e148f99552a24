package byre.alerts;

/**
 * Acknowledges an open incident; the admin HTTP handler for {@code POST /ack} and the MQTT ack topic call
 * this. Implementations commit the {@code acknowledged} events to the outbox before returning.
 */
public interface AckService {
    AckResult acknowledge(String incidentId, String by);
}
