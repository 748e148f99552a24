package byre.notify;

import byre.alerts.AlertEvent;
import byre.config.ChannelFields;
import byre.config.PublishesToBroker;
import byre.mqtt.MqttLink;
import java.util.List;

/**
 * Publishes the event JSON at QoS 1 on byre's own broker connection and waits for the broker's PUBACK; with
 * {@code retain: true} the broker keeps the last event for whoever subscribes later (a siren, a display).
 */
public final class MqttChannel implements Channel {
    public record Settings(String topic, boolean retain) implements PublishesToBroker {
        @Override
        public String brokerTopic() {
            return topic;
        }
    }

    public static final ChannelKind<Settings> KIND = ChannelKind.of("mqtt", List.of("topic", "retain"), List.of("topic"), MqttChannel::read,
            (name, s, ctx) -> new MqttChannel(name, s.topic(), s.retain(), ctx.link(), ChannelFactory.DEFAULT_TIMEOUT.toMillis()));

    static Settings read(ChannelFields f) {
        String topic = f.string("topic", "");
        if (topic.contains("+") || topic.contains("#")) {
            f.problem("topic", f.channel() + ".topic '" + topic + "' may not contain MQTT wildcards ('+', '#'): it is where events are published");
        }
        return new Settings(topic, f.bool("retain", false));
    }

    private final String name;
    private final String topic;
    private final MqttLink link;
    private final boolean retain;
    private final long timeoutMs;

    public MqttChannel(String name, String topic, boolean retain, MqttLink link, long timeoutMs) {
        this.name = name;
        this.topic = topic;
        this.retain = retain;
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
        if (link.publishAndWait(topic, event.toJson(), retain, timeoutMs)) return DeliveryResult.success((retain ? "published (retained) to " : "published to ") + topic);
        return DeliveryResult.failure(FailureReason.TIMEOUT, "the broker did not acknowledge the publication to " + topic
                + " within " + timeoutMs + " ms (" + link.lastError() + ")");
    }
}
