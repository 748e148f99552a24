package byre.cli;

import byre.config.ByreConfig;
import byre.history.HistoryStore;
import byre.history.HistoryWriter;
import byre.history.Retention;
import byre.history.StreamKey;
import byre.testing.Configs;
import byre.units.Quantity;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.List;
import java.time.ZoneOffset;

/** A real SQLite history of the Larkmoor calf barn and cow shed, written through the daemon's own writer. */
final class PreparedHistory {
    /** The tests' "now": 2026-07-14 14:05 UTC (15:05 in London). */
    static final Instant NOW = Instant.parse("2026-07-14T14:05:00Z");

    private PreparedHistory() {}

    static String yaml(Path db, String units) {
        return """
                site: larkmoor
                timezone: Europe/London
                units: %s
                mqtt:
                  broker: embedded
                  listen: 127.0.0.1:0
                sensors:
                  pen1-dry: { topic: larkmoor/calf-barn/pen1/dry, quantity: dry-bulb }
                  pen1-wet: { topic: larkmoor/calf-barn/pen1/wet, quantity: wet-bulb }
                  pen1-air: { topic: larkmoor/calf-barn/pen1/air, quantity: air-speed }
                  shed-dry: { topic: larkmoor/cow-shed/dry, quantity: dry-bulb }
                  shed-rh:  { topic: larkmoor/cow-shed/rh, quantity: rh }
                zones:
                  calf-pen-1: { groups: [calves], sensors: [pen1-dry, pen1-wet, pen1-air], max-age: 5m }
                  cow-shed:   { groups: [cows], sensors: [shed-dry, shed-rh], max-age: 5m }
                history:
                  path: %s
                admin:
                  listen: 127.0.0.1:0
                """.formatted(units, db);
    }

    static ByreConfig config(Path dir, String units) throws Exception {
        Path db = dir.resolve("history.db");
        Path file = dir.resolve("byre.yaml");
        Files.writeString(file, yaml(db, units));
        return Configs.load(file);
    }

    /**
     * 24 hours of hourly cow-shed THI rising from 60 to 83, calf-pen dry bulb two minutes old, its wind chill twenty, pen1-wet silent for
     * three hours, pen1-air never reporting, and one open alert in the state table.
     */
    static void write(Path db) {
        Clock clock = Clock.fixed(NOW, ZoneOffset.UTC);
        try (HistoryStore store = HistoryStore.open(db, clock)) {
            HistoryWriter w = HistoryWriter.start(store, new Retention(Duration.ofDays(14), Duration.ofDays(90), Duration.ofDays(1825)), clock);
            Instant start = Instant.parse("2026-07-13T15:00:00Z");
            for (int h = 0; h < 24; h++) {
                Instant at = start.plus(Duration.ofHours(h)).plusSeconds(60);
                w.append(StreamKey.zone("cow-shed", Quantity.THI), at, 60 + h);
                w.append(StreamKey.zone("cow-shed", Quantity.DRY_BULB), at, 15 + h * 0.5);
                w.append(StreamKey.zone("cow-shed", Quantity.RH), at, 70);
                w.append(StreamKey.sensor("shed-dry"), at, 15 + h * 0.5);
                w.append(StreamKey.sensor("shed-rh"), at, 70);
            }
            // The last hour's readings (14:01) are 4 minutes old at NOW: fresh.
            Instant recent = NOW.minusSeconds(120);
            w.append(StreamKey.zone("calf-pen-1", Quantity.DRY_BULB), recent, 5.0);
            w.append(StreamKey.zone("calf-pen-1", Quantity.WIND_CHILL), NOW.minus(Duration.ofMinutes(20)), 2.5);
            w.append(StreamKey.sensor("pen1-dry"), recent, 5.0);
            w.append(StreamKey.sensor("pen1-wet"), NOW.minus(Duration.ofHours(3)), 4.0);
            w.flush();
            w.close();
            // The alert stage's stored incidents: heat stress in the cow shed, raised at 13:35 and still open.
            byre.alerts.IncidentBook book = new byre.alerts.IncidentBook("larkmoor", byre.alerts.IdSource.counting());
            book.accept(new byre.alerts.WatchOutcome(byre.alerts.WatchOutcome.Kind.RAISED, "heat-stress", "cow-shed", "warning", "thi",
                    73.4, "", Instant.parse("2026-07-14T13:05:00Z"), Instant.parse("2026-07-14T13:35:00Z"),
                    "Heat stress in cow-shed, THI 73.4", new byre.alerts.AlertPolicy(List.of("office"), null, null, List.of())));
            store.putState(byre.notify.AlertService.STATE_KEY, book.snapshot());
        }
    }
}
