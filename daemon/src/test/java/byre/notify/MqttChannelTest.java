package byre.notify;

import byre.testing.Configs;
import byre.testing.Mosquitto;
import byre.testing.MutableClock;
import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.alerts.AlertPolicy;
import byre.alerts.IdSource;
import byre.alerts.OpenIncident;
import byre.alerts.WatchOutcome;
import byre.config.ByreConfig;
import byre.config.ConfigException;
import byre.config.MqttSettings;
import byre.history.HistoryStore;
import byre.json.Json;
import byre.mqtt.EmbeddedBroker;
import byre.mqtt.MqttLink;
import byre.testing.TestPublisher;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.concurrent.CopyOnWriteArrayList;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The mqtt channel publishes event JSON at QoS 1; the ack topic acknowledges; both against a real broker. */
class MqttChannelTest {
    static final Instant T0 = Instant.parse("2026-07-14T22:10:00Z");

    @TempDir
    Path dir;

    @Test
    void publishesEventsAndAcceptsAcknowledgementsFromTheAckTopic() throws Exception {
        try (EmbeddedBroker broker = EmbeddedBroker.start("127.0.0.1", 0);
             HistoryStore store = HistoryStore.open(dir.resolve("history.db"));
             TestPublisher listener = new TestPublisher(broker.uri())) {
            List<String> siren = new CopyOnWriteArrayList<>();
            listener.client().subscribe("barn/siren/set", 1, (t, m) -> siren.add(new String(m.getPayload(), StandardCharsets.UTF_8)));

            MqttSettings settings = new MqttSettings(broker.uri(), "127.0.0.1", broker.port(), "byre-larkmoor-test", null, null, "byre", 1, null);
            MqttLink link = new MqttLink(settings, "larkmoor", new SimpleMeterRegistry());
            MutableClock clock = new MutableClock(T0);
            Channel ch = new MqttChannel("barn-siren", "barn/siren/set", false, link, 5000);
            AlertService s = AlertServices.assemble("larkmoor", Map.of("barn-siren", ch), Map.of(), new Outbox(store.openSyncedConnection()),
                    store::putState, store::loadState, clock, new Random(1), IdSource.counting(), new SimpleMeterRegistry(), List.of(),
                    Duration.ofMinutes(15), "byre/larkmoor/ack");
            link.subscribe(s.ackTopic(), s::onAckMessage);

            // before the link is up: a failure with its reason, the event stays in the outbox
            s.accept(new WatchOutcome(WatchOutcome.Kind.RAISED, "calf-chill", "calf-pen-1", "critical", "wind-chill", 3.1, "degC", T0, T0,
                    "Cold wind in calf-pen-1", new AlertPolicy(List.of("barn-siren"), Duration.ofMinutes(30), null, List.of())));
            s.runOnce();
            assertEquals(1, s.outbox().depth());
            assertTrue(s.dispatcher().lastFailure("barn-siren").startsWith("not-connected"), s.dispatcher().lastFailure("barn-siren"));

            link.start();
            await().atMost(Duration.ofSeconds(15)).until(link::isConnected);
            clock.advance(Duration.ofSeconds(10));
            s.runOnce();
            await().atMost(Duration.ofSeconds(10)).until(() -> siren.size() == 1);
            Map<?, ?> raised = (Map<?, ?>) Json.parse(siren.get(0));
            assertEquals("raised", raised.get("event"));
            assertEquals("i1", raised.get("incident"));

            listener.publish("byre/larkmoor/ack", "{\"incident\":\"i1\",\"by\":\"Dana\"}", 1, false);
            await().atMost(Duration.ofSeconds(10)).until(() -> s.book().openIncidents().get(0).ackBy() != null);
            OpenIncident inc = s.book().openIncidents().get(0);
            assertEquals("Dana", inc.ackBy());
            s.runOnce();
            await().atMost(Duration.ofSeconds(10)).until(() -> siren.size() == 2);
            assertEquals("acknowledged", ((Map<?, ?>) Json.parse(siren.get(1))).get("event"));
            // no reminder after the acknowledgement
            clock.advance(Duration.ofHours(2));
            s.tick();
            s.runOnce();
            assertEquals(0, s.outbox().depth());
            assertEquals(2, siren.size());
            s.close();
            link.close();
        }
    }

    @Test
    void retainTrueLeavesTheEventWithTheBrokerForWhoeverSubscribesLater() throws Exception {
        ByreConfig cfg = Configs.parse("byre.yaml", """
                site: larkmoor
                notify:
                  barn-siren: { type: mqtt, topic: larkmoor/siren/set, retain: true }
                  barn-lamp: { type: mqtt, topic: larkmoor/lamp/set }
                """, dir, n -> null);
        // mosquitto: it flags a retained message as such when it hands it to a new subscriber
        try (Mosquitto broker = Mosquitto.start()) {
            MqttSettings settings = new MqttSettings(broker.uri(), "127.0.0.1", broker.port(), "byre-larkmoor-retain", null, null, "byre", 1, null);
            MqttLink link = new MqttLink(settings, "larkmoor", new SimpleMeterRegistry());
            try {
                link.start();
                await().atMost(Duration.ofSeconds(15)).until(link::isConnected);
                ChannelFactory factory = new ChannelFactory(link, java.time.ZoneOffset.UTC);
                DeliveryResult siren = factory.build(cfg.channels().get("barn-siren")).deliver(EmailChannelTest.EVENT);
                assertTrue(siren.ok(), siren.toString());
                assertEquals("published (retained) to larkmoor/siren/set", siren.detail());
                assertTrue(factory.build(cfg.channels().get("barn-lamp")).deliver(EmailChannelTest.EVENT).ok());
            } finally {
                link.close();
            }
            // a subscriber that arrives afterwards gets the retained event (flagged retained), and only that one;
            // the marker published after the subscription shows that nothing else was kept
            List<String> got = new CopyOnWriteArrayList<>();
            try (TestPublisher late = new TestPublisher(broker.uri())) {
                late.client().subscribe("larkmoor/+/set", 1, (t, m) -> got.add(t + (m.isRetained() ? " retained " : " ")
                        + Json.parse(new String(m.getPayload(), StandardCharsets.UTF_8)).getClass().getSimpleName()));
                late.publish("larkmoor/marker/set", "{}", 1, false);
                await().atMost(Duration.ofSeconds(10)).until(() -> got.stream().anyMatch(g -> g.startsWith("larkmoor/marker/set")));
            }
            assertEquals("larkmoor/siren/set retained", got.get(0).substring(0, got.get(0).lastIndexOf(' ')));
            assertEquals(2, got.size(), got.toString());
        }
    }

    @Test
    void retainMustBeTrueOrFalse() {
        ConfigException e = org.junit.jupiter.api.Assertions.assertThrows(ConfigException.class, () -> Configs.parse("byre.yaml",
                "site: larkmoor\nnotify:\n  barn-siren: { type: mqtt, topic: larkmoor/siren/set, retain: sometimes }\n", dir, n -> null));
        assertEquals("[byre.yaml:3:64: barn-siren.retain must be true or false, not 'sometimes']", e.problems().stream().map(Object::toString).toList().toString());
    }
}
