package byre.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.config.ByreConfig;
import byre.config.ZoneConfig;
import byre.history.HistoryStore;
import byre.history.HistoryWriter;
import byre.history.Retention;
import byre.history.StreamKey;
import byre.rules.RuleSet;
import byre.testing.Configs;
import ch.qos.logback.classic.Logger;
import ch.qos.logback.classic.spi.ILoggingEvent;
import ch.qos.logback.core.read.ListAppender;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneOffset;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.slf4j.LoggerFactory;

/** The max-age of a zone without one follows how often its sensors report, learnt from a real history file. */
class FreshnessTest {
    @TempDir
    Path dir;

    static final Instant NOW = Instant.parse("2026-07-14T14:05:00Z");

    ByreConfig config() throws Exception {
        Files.createDirectories(dir.resolve("rules.d"));
        Files.writeString(dir.resolve("rules.d/heat.rules"),
                "watch heat\n  raise when cow-shed.thi >= 75 for 30m\n  clear when cow-shed.thi <= 73 for 30m\n  notify office\n");
        Path file = Files.writeString(dir.resolve("byre.yaml"), """
                site: larkmoor
                sensors:
                  shed-dry: { topic: t/dry, quantity: dry-bulb }
                  shed-rh: { topic: t/rh, quantity: rh }
                  pen1-dry: { topic: t/p1, quantity: dry-bulb }
                  pen2-dry: { topic: t/p2, quantity: dry-bulb }
                zones:
                  cow-shed: { groups: [cows], sensors: [shed-dry, shed-rh] }
                  calf-pen-1: { groups: [calves], sensors: [pen1-dry], max-age: 5m }
                  calf-pen-2: { groups: [calves], sensors: [pen2-dry] }
                notify:
                  office: { type: command, argv: [/bin/true] }
                rules: rules.d
                history: { path: history.db }
                """);
        return Configs.load(file);
    }

    /** A day of readings: shed-dry every 5 minutes (a battery sensor), shed-rh and pen1-dry every 5 minutes, pen2 none. */
    void history(int shedDryEverySeconds) {
        try (HistoryStore store = HistoryStore.open(dir.resolve("history.db"))) {
            HistoryWriter w = HistoryWriter.start(store, Retention.DEFAULT, Clock.fixed(NOW, ZoneOffset.UTC));
            for (int s = 6 * 3600; s > 0; s -= 60) {
                if (s % shedDryEverySeconds == 0) w.append(StreamKey.sensor("shed-dry"), NOW.minusSeconds(s), 20.0);
                w.append(StreamKey.sensor("shed-rh"), NOW.minusSeconds(s + 7), 60.0);
                if (s % 300 == 0) w.append(StreamKey.sensor("pen1-dry"), NOW.minusSeconds(s - 3), 8.0);
            }
            w.close();
        }
    }

    @Test
    void theLearntMaxAgeIsTwoAndAHalfIntervalsAndAtLeastTwoMinutes() {
        assertEquals(Duration.ofSeconds(150), Freshness.learnt(Duration.ofMinutes(1)));
        assertEquals(Duration.ofSeconds(750), Freshness.learnt(Duration.ofMinutes(5)));
        assertEquals(Duration.ofSeconds(751), Freshness.learnt(Duration.ofMillis(300_100)), "rounded up to whole seconds");
        assertEquals(Duration.ofMinutes(2), Freshness.learnt(Duration.ofSeconds(10)));
    }

    @Test
    void aNewInstallUsesTheFixedDefaultAndConfiguredMaxAgesStay() throws Exception {
        ByreConfig cfg = config();
        RuleLoader loader = new RuleLoader(cfg, Clock.fixed(NOW, ZoneOffset.UTC));
        RuleSet rules = loader.load().orElseThrow();
        assertEquals(Duration.ofMinutes(11), rules.maxAge("cow-shed"), "nothing learnt yet: 11m covers a 5-minute sensor missing one report");
        assertEquals(Duration.ofMinutes(5), rules.maxAge("calf-pen-1"));
        assertTrue(loader.stillLearning());
    }

    @Test
    void zonesWithoutMaxAgeFollowTheirSlowestSensorAndTheLogSaysWhereAMaxAgeIsTooShort() throws Exception {
        history(300);
        ByreConfig cfg = config();
        ListAppender<ILoggingEvent> log = new ListAppender<>();
        log.start();
        Logger logger = (Logger) LoggerFactory.getLogger(RuleLoader.class);
        logger.addAppender(log);
        try {
            RuleLoader loader = new RuleLoader(cfg, Clock.fixed(NOW, ZoneOffset.UTC));
            RuleSet rules = loader.load().orElseThrow();
            // shed-dry every 5 minutes, shed-rh every minute: the zone follows the slower one.
            assertEquals(Duration.ofSeconds(750), rules.maxAge("cow-shed"));
            assertEquals(Duration.ofSeconds(750), loader.effective().zones().get("cow-shed").maxAge(), "the zone stage gets the same");
            assertEquals(Duration.ofMinutes(5), rules.maxAge("calf-pen-1"), "a max-age in the file is kept");
            assertEquals(ZoneConfig.UNLEARNT_MAX_AGE, rules.maxAge("calf-pen-2"), "no history for its sensor yet");
            List<String> warnings = log.list.stream().map(ILoggingEvent::getFormattedMessage).filter(m -> m.startsWith("stream ")).toList();
            assertEquals(List.of("stream calf-pen-1.dry-bulb (sensor pen1-dry) reports every 5m, close to or above the max-age of zone calf-pen-1 (5m):"
                    + " one late or missed reading leaves it without data, so watches on it fall back and silent() fires;"
                    + " set 'max-age: 13m' for zone calf-pen-1 (byre.yaml:9), or leave max-age out to have it follow the sensors"), warnings);
            loader.load();
            assertEquals(1, log.list.stream().filter(e -> e.getFormattedMessage().startsWith("stream ")).count(), "logged once, not at every reload");
        } finally {
            logger.detachAppender(log);
        }
    }

    @Test
    void aReloadPicksUpWhatTheHistoryHasLearntSinceStart() throws Exception {
        ByreConfig cfg = config();
        RuleLoader loader = new RuleLoader(cfg, Clock.fixed(NOW, ZoneOffset.UTC));
        loader.load().orElseThrow();
        assertTrue(!loader.maxAgesChanged());
        history(60);
        assertTrue(loader.maxAgesChanged(), "the history now knows the shed reports every minute");
        assertEquals(Duration.ofSeconds(150), loader.load().orElseThrow().maxAge("cow-shed"));
    }

    @Test
    void aNewInstallLearnsTheMaxAgeAsTheHistoryFillsAndReloadsByItself() throws Exception {
        ByreConfig cfg = config();
        RuleLoader loader = new RuleLoader(cfg, Clock.fixed(NOW, ZoneOffset.UTC));
        RuleSet start = loader.load().orElseThrow();
        assertEquals(Duration.ofMinutes(11), start.maxAge("cow-shed"));
        try (HistoryStore store = HistoryStore.open(dir.resolve("history.db"))) {
            WatchStage watches = new WatchStage(start, store, ZoneOffset.UTC, (t, w) -> { }, NOW);
            RuleReload reload = new RuleReload(loader, watches, () -> false);
            reload.tick(NOW);
            assertEquals(0, reload.loaded(), "nothing learnt yet: nothing to reload");
            history(60);
            reload.tick(NOW.plusSeconds(60));
            assertEquals(0, reload.loaded(), "looked at hourly, not at every tick");
            reload.tick(NOW.plus(Duration.ofHours(1)));
            assertEquals(1, reload.loaded());
            assertEquals(Duration.ofSeconds(150), watches.engine().rules().maxAge("cow-shed"));
            reload.tick(NOW.plus(Duration.ofHours(2)));
            assertEquals(1, reload.loaded(), "calf-pen-2 is still unlearnt, but nothing new was learnt");
        }
    }
}
