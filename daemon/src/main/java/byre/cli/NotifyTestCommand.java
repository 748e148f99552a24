package byre.cli;

import byre.alerts.AlertEvent;
import byre.alerts.EventKind;
import byre.alerts.EventText;
import byre.alerts.IdSource;
import byre.config.ByreConfig;
import byre.config.ChannelConfig;
import byre.config.MqttSettings;
import byre.notify.Channel;
import byre.notify.ChannelFactory;
import byre.notify.DeliveryResult;
import byre.notify.FailureReason;
import byre.notify.MqttChannel;
import byre.units.Suggest;
import java.nio.charset.StandardCharsets;
import java.time.Instant;
import java.util.List;
import java.util.concurrent.Callable;
import org.eclipse.paho.client.mqttv3.MqttClient;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.MqttException;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;
import picocli.CommandLine.Command;
import picocli.CommandLine.Mixin;
import picocli.CommandLine.Parameters;

/** {@code byre notify-test CHANNEL}: one {@code test} event straight through one channel (no outbox, no retries). */
@Command(name = "notify-test", mixinStandardHelpOptions = true, description = "Send a test event through one channel and report the result.")
final class NotifyTestCommand implements Callable<Integer> {
    @Parameters(index = "0", paramLabel = "CHANNEL", description = "A channel name from the notify: section.")
    String channel;

    @Mixin
    ConfigOption config = new ConfigOption();

    @Override
    public Integer call() {
        ByreConfig cfg = config.load(System.err);
        if (cfg == null) return Main.USAGE;
        ChannelConfig cc = cfg.channels().get(channel);
        if (cc == null) {
            System.err.println("byre: no channel named '" + channel + "' in " + cfg.file() + Suggest.hint(channel, cfg.channels().keySet())
                    + (cfg.channels().isEmpty() ? " (the notify: section is empty)" : "; channels: " + String.join(", ", cfg.channels().keySet())));
            return Main.USAGE;
        }
        Instant now = Instant.now();
        String incident = "test-" + now.getEpochSecond();
        AlertEvent test = new AlertEvent(IdSource.random().eventId(now), incident, EventKind.TEST, cfg.site(),
                "notify-test", "byre", "info", null, Double.NaN, null, now, now,
                EventText.metric(cfg.site()).test(channel, incident), null, List.of(), List.of(channel));
        DeliveryResult r;
        if (cc.settings() instanceof MqttChannel.Settings m) {
            r = mqtt(cfg.mqtt(), m.topic(), m.retain(), test.toJson());
        } else {
            Channel ch;
            try {
                ch = new ChannelFactory(null, cfg.timezone()).build(cc);
            } catch (IllegalArgumentException e) {
                System.err.println("byre: " + e.getMessage());
                return Main.USAGE;
            }
            r = ch.deliver(test);
        }
        if (r.ok()) {
            System.out.println("ok: test event " + test.id() + " sent through " + channel + " (" + cc.type() + "): " + r.detail());
            return Main.OK;
        }
        System.out.println("FAILED (" + r.reason().tag() + "): " + channel + " (" + cc.type() + "): " + r.detail());
        return Main.FAILURE;
    }

    /** A short-lived client of its own (clean session, no last will), so the daemon's session and status stay untouched. */
    static DeliveryResult mqtt(MqttSettings s, String topic, boolean retain, String json) {
        MqttClient c = null;
        try {
            c = new MqttClient(s.connectUri(), s.clientId() + "-notify-test", new MemoryPersistence());
            MqttConnectOptions o = new MqttConnectOptions();
            o.setCleanSession(true);
            o.setConnectionTimeout(10);
            o.setMqttVersion(MqttConnectOptions.MQTT_VERSION_3_1_1);
            if (s.username() != null) o.setUserName(s.username());
            if (s.password() != null) o.setPassword(s.password().reveal().toCharArray());
            c.connect(o);
            c.publish(topic, json.getBytes(StandardCharsets.UTF_8), 1, retain);
            return DeliveryResult.success((retain ? "published (retained) to " : "published to ") + topic + " on " + s.connectUri());
        } catch (MqttException e) {
            FailureReason why = e.getReasonCode() == MqttException.REASON_CODE_CLIENT_TIMEOUT ? FailureReason.TIMEOUT
                    : e.getReasonCode() == MqttException.REASON_CODE_SERVER_CONNECT_ERROR ? FailureReason.REFUSED : FailureReason.IO;
            return DeliveryResult.failure(why, "MQTT " + s.connectUri() + ": " + e.getMessage()
                    + (e.getCause() == null ? "" : " (" + e.getCause().getMessage() + ")"));
        } finally {
            if (c != null) {
                try {
                    if (c.isConnected()) c.disconnect(2000);
                    c.close();
                } catch (MqttException ignored) {
                    // done anyway
                }
            }
        }
    }
}
