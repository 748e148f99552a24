package byre.notify;

import byre.alerts.AlertEvent;
import byre.alerts.AlertPolicy;
import byre.alerts.IdSource;
import byre.alerts.WatchOutcome;
import byre.history.HistoryStore;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.net.URI;
import java.nio.file.Path;
import java.security.SecureRandom;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.List;
import java.util.Map;

/**
 * A separate JVM for {@link KillNineTest}: raises incidents as fast as it can, printing "C <event id>" once each
 * event is committed, while the dispatcher delivers them to a webhook. With "drain" it only delivers, then
 * prints DONE when the outbox is empty.
 */
public final class CrashWorker {
    public static void main(String[] args) throws Exception {
        Path db = Path.of(args[0]);
        URI url = URI.create(args[1]);
        String mode = args[2];
        String run = args[3];
        HistoryStore store = HistoryStore.open(db);
        Clock clock = Clock.systemUTC();
        Channel hook = new WebhookChannel("night-phone", url, null, Map.of(), null, Duration.ofSeconds(2));
        AlertService s = AlertServices.assemble("larkmoor", Map.of("night-phone", hook),
                Map.of("night-phone", new ChannelFactory.Policy(1_000_000, Duration.ofHours(24))), new Outbox(store.openSyncedConnection()),
                store::putState, store::loadState, clock, new SecureRandom(), IdSource.random(), new SimpleMeterRegistry(), List.of(),
                Duration.ofDays(1), "byre/larkmoor/ack");
        s.start();
        System.out.println("READY");
        System.out.flush();
        if (mode.equals("drain")) {
            long deadline = System.nanoTime() + 60_000_000_000L;
            while (s.outbox().depth() > 0 && System.nanoTime() < deadline) Thread.sleep(20);
            System.out.println(s.outbox().depth() == 0 ? "DONE" : "STUCK " + s.outbox().depth());
            s.close();
            store.close();
            return;
        }
        AlertPolicy policy = AlertPolicy.notifyOnly(List.of("night-phone"));
        for (int i = 0; ; i++) {
            Instant now = clock.instant();
            String zone = "pen-" + run + "-" + i;
            List<AlertEvent> committed = s.accept(new WatchOutcome(WatchOutcome.Kind.RAISED, "calf-chill", zone, "critical", "wind-chill",
                    2.0, "degC", now, now, "Cold wind in " + zone, policy));
            for (AlertEvent e : committed) System.out.println("C " + e.id());
            System.out.flush();
            Thread.sleep(3);
        }
    }
}
