package byre.notify;

import byre.alerts.AlertEvent;
import byre.mqtt.MqttLink;

/** Publishes the event JSON at QoS 1 on byre's own broker connection and waits for the broker's PUBACK. */
public final class MqttChannel implements Channel {
    private final String name;
    private final String topic;
    private final MqttLink link;
    private final long timeoutMs;

    public MqttChannel(String name, String topic, MqttLink link, long timeoutMs) {
        this.name = name;
        this.topic = topic;
        this.link = link;
        this.timeoutMs = timeoutMs;
    }

    @Override
    public String name() {
        return name;
    }

    @Override
    public String type() {
        return "mqtt";
    }

    @Override
    public DeliveryResult deliver(AlertEvent event) {
        if (link == null) return DeliveryResult.failure(FailureReason.CONFIG, "no MQTT connection in this process");
        if (!link.isConnected()) {
            return DeliveryResult.failure(FailureReason.NOT_CONNECTED, "not connected to the broker (" + link.lastError() + ")");
        }
        if (link.publishAndWait(topic, event.toJson(), timeoutMs)) return DeliveryResult.success("published to " + topic);
        return DeliveryResult.failure(FailureReason.TIMEOUT, "the broker did not acknowledge the publication to " + topic
                + " within " + timeoutMs + " ms (" + link.lastError() + ")");
    }
}
