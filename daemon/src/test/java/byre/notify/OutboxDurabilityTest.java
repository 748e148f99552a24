package byre.notify;

import byre.testing.MutableClock;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.alerts.AlertPolicy;
import byre.alerts.IdSource;
import byre.alerts.WatchOutcome;
import byre.history.HistoryStore;
import byre.json.Json;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.net.URI;
import java.nio.file.Path;
import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.ResultSet;
import java.sql.Statement;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Random;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The outbox in a real SQLite file: restarts lose nothing, a long outage ends in order and within the rate limit. */
class OutboxDurabilityTest {
    static final Instant T0 = Instant.parse("2026-01-20T01:00:00Z");

    @TempDir
    Path dir;

    AlertService service(HistoryStore store, URI url, MutableClock clock, int ratePerTenMinutes) {
        Channel hook = new WebhookChannel("night-phone", url, null, Map.of(), null, Duration.ofSeconds(2));
        return AlertServices.assemble("larkmoor", Map.of("night-phone", hook),
                Map.of("night-phone", new ChannelFactory.Policy(ratePerTenMinutes, Duration.ofHours(24))),
                new Outbox(store.openSyncedConnection()), store::putState, store::loadState, clock, new Random(3),
                IdSource.random(), new SimpleMeterRegistry(), List.of(), Duration.ofDays(1), "byre/larkmoor/ack");
    }

    static WatchOutcome outcome(WatchOutcome.Kind kind, String zone, Instant at, AlertPolicy policy) {
        return new WatchOutcome(kind, "calf-chill", zone, "critical", "wind-chill", 3.1, "degC", at, at,
                "Cold wind in " + zone + ": wind chill 3.1 C.", policy);
    }

    static List<String> column(Path db, String sql) throws Exception {
        List<String> out = new ArrayList<>();
        try (Connection c = DriverManager.getConnection("jdbc:sqlite:" + db); Statement st = c.createStatement(); ResultSet rs = st.executeQuery(sql)) {
            while (rs.next()) out.add(rs.getString(1));
        }
        return out;
    }

    /** The event ids a receiver has, in arrival order, with a summary standing for the events it folds. */
    static List<String> receivedIds(Receiver r) {
        List<String> ids = new ArrayList<>();
        for (Receiver.Request q : r.requests()) {
            Map<?, ?> m = (Map<?, ?>) Json.parse(q.body());
            if (m.get("folded") instanceof List<?> f) for (Object o : f) ids.add((String) o);
            else ids.add((String) m.get("id"));
        }
        return ids;
    }

    @Test
    void committedEventsSurviveARestartAndTheIncidentIsNotRaisedAgain() throws Exception {
        Path db = dir.resolve("history.db");
        MutableClock clock = new MutableClock(T0);
        AlertPolicy policy = AlertPolicy.notifyOnly(List.of("night-phone"));
        try (Receiver receiver = new Receiver()) {
            HistoryStore store = HistoryStore.open(db);
            AlertService before = service(store, receiver.url(), clock, 10);
            for (int i = 1; i <= 5; i++) before.accept(outcome(WatchOutcome.Kind.RAISED, "calf-pen-" + i, T0, policy));
            // stopped before any delivery attempt
            before.close();
            store.close();
            assertTrue(receiver.requests().isEmpty());

            store = HistoryStore.open(db);
            AlertService after = service(store, receiver.url(), clock, 10);
            after.accept(outcome(WatchOutcome.Kind.RAISED, "calf-pen-1", T0.plusSeconds(60), policy));
            after.runOnce();
            assertEquals(column(db, "SELECT id FROM outbox_event ORDER BY seq"), receivedIds(receiver));
            assertEquals(5, receiver.requests().size(), "five raised events, the repeated RAISED sent nothing");
            assertEquals(0, after.outbox().depth());
            after.close();
            store.close();
        }
    }

    @Test
    void aChannelDownForSixHoursGetsEverythingInOrderAndRemindersDoNotPileUp() throws Exception {
        Path db = dir.resolve("history.db");
        MutableClock clock = new MutableClock(T0);
        int limit = 5;
        AlertPolicy policy = new AlertPolicy(List.of("night-phone"), Duration.ofMinutes(30), null, List.of());
        try (Receiver receiver = new Receiver(); HistoryStore store = HistoryStore.open(db)) {
            receiver.status.set(503);
            AlertService s = service(store, receiver.url(), clock, limit);
            // six hours, a pass every 30 s; a new calf pen raises every 45 minutes, one clears after 3 h
            for (int step = 0; step <= 6 * 120; step++) {
                Instant now = clock.instant();
                if (step % 90 == 0) s.accept(outcome(WatchOutcome.Kind.RAISED, "calf-pen-" + (step / 90), now, policy));
                if (step == 360) s.accept(outcome(WatchOutcome.Kind.CLEARED, "calf-pen-0", now, policy));
                s.tick();
                s.runOnce();
                clock.advance(Duration.ofSeconds(30));
            }
            long attemptsWhileDown = receiver.requests().size();
            assertTrue(attemptsWhileDown > 30 && attemptsWhileDown < 60, "retries backed off to 10 min: " + attemptsWhileDown);
            // reminders: 8 incidents each due every 30 min for up to 6 h, yet at most one waits per incident
            List<String> kinds = column(db, "SELECT e.kind FROM outbox_delivery d JOIN outbox_event e ON e.seq = d.event WHERE d.state = 'pending'");
            long reminders = kinds.stream().filter("reminder"::equals).count();
            assertTrue(reminders <= 8, "pending reminders: " + reminders);

            receiver.status.set(200);
            List<Instant> deliveredAt = new ArrayList<>();
            int before = receiver.requests().size();
            for (int step = 0; step < 240; step++) { // two more hours with the channel back
                s.runOnce();
                for (int i = before; i < receiver.requests().size(); i++) {
                    if (receiver.requests().get(i).body().contains("\"event\"")) deliveredAt.add(clock.instant());
                }
                before = receiver.requests().size();
                if (step < 200) s.tick(); // the last 20 minutes without new reminders, to drain
                clock.advance(Duration.ofSeconds(30));
            }
            assertEquals(0, s.outbox().depth(), "everything delivered");
            // order: every event committed (summaries aside) reaches the receiver once, in commit order
            List<String> committed = column(db, "SELECT id FROM outbox_event WHERE kind <> 'summary' ORDER BY seq");
            List<String> got = receivedIds(receiver).stream().distinct().toList();
            assertEquals(committed, got);
            // rate limit: never more than `limit` successful messages in any 10 minutes
            for (int i = 0; i + limit < deliveredAt.size(); i++) {
                assertTrue(Duration.between(deliveredAt.get(i), deliveredAt.get(i + limit)).compareTo(Dispatcher.RATE_WINDOW) >= 0,
                        "more than " + limit + " messages within 10 minutes around " + deliveredAt.get(i));
            }
            assertTrue(receiver.requests().stream().anyMatch(r -> r.body().contains("over the rate limit of night-phone")), "a summary was sent");
            s.close();
        }
    }
}
