package byre.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.history.HistoryStore;
import byre.history.HistoryWriter;
import byre.history.Retention;
import byre.history.StreamKey;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Instant;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** {@code byre check}: every problem at once, exit codes, the safety note, and hold times against real reporting. */
class CheckCommandTest {
    @TempDir
    Path dir;

    /** A cow shed with a dry bulb and RH, one channel, rules in rules.d (also used by {@code CheckLimitsTest}). */
    static final String COW_SHED = """
            site: larkmoor
            sensors:
              shed-dry: { topic: t/dry, quantity: dry-bulb }
              shed-rh: { topic: t/rh, quantity: rh }
            zones:
              cow-shed: { groups: [cows], sensors: [shed-dry, shed-rh] }
            notify:
              office: { type: command, argv: [/bin/true] }
            rules: rules.d
            history: { path: history.db }
            """;

    Path config() throws Exception {
        return Files.writeString(dir.resolve("byre.yaml"), COW_SHED);
    }

    @Test
    void aGoodFileIsOkAndCarriesTheSafetyNote() throws Exception {
        Files.createDirectories(dir.resolve("rules.d"));
        Files.writeString(dir.resolve("rules.d/heat.rules"),
                "watch heat\n  raise when cow-shed.thi >= 72 for 30m\n  clear when cow-shed.thi <= 70 for 20m\n  notify office\n");
        CliRun r = CliRun.of("check", "--config", config().toString());
        assertEquals(Main.OK, r.code(), r.err());
        assertTrue(r.out().contains("1 rule file ok, 1 watch, 0 warnings"), r.out());
        assertTrue(r.out().contains("veterinarian"), r.out());
    }

    @Test
    void everyProblemAtOnceWithPositionsAndANonZeroExit() throws Exception {
        Files.createDirectories(dir.resolve("rules.d"));
        Files.writeString(dir.resolve("rules.d/bad.rules"),
                "watch a\n  raise when cow-shed.thii >= 72\n  notify ofice\n");
        CliRun r = CliRun.of("check", "--config", config().toString());
        assertEquals(Main.USAGE, r.code());
        assertTrue(r.err().contains("bad.rules:2:23: unknown quantity 'thii' (did you mean 'thi'?)"), r.err());
        assertTrue(r.err().contains("bad.rules:3:10: unknown channel 'ofice' (did you mean 'office'?)"), r.err());
    }

    @Test
    void aHoldShorterThanTheRealReportingIntervalIsWarnedAbout() throws Exception {
        config();
        // The history says the shed's sensors report once a minute.
        Instant now = Instant.now();
        try (HistoryStore store = HistoryStore.open(dir.resolve("history.db"))) {
            HistoryWriter w = HistoryWriter.start(store, Retention.DEFAULT, Clock.systemUTC());
            for (int i = 60; i > 0; i--) {
                w.append(StreamKey.sensor("shed-dry"), now.minusSeconds(60L * i), 20.0 + i * 0.01);
                w.append(StreamKey.sensor("shed-rh"), now.minusSeconds(60L * i + 7), 60.0);
            }
            w.close();
        }
        Path quick = Files.writeString(dir.resolve("quick.rules"),
                "watch quick\n  raise when cow-shed.dry-bulb > 30 C for 20s\n  clear when cow-shed.dry-bulb < 28 C for 20s\n  notify office\n");

        CliRun r = CliRun.of("check", "--config", dir.resolve("byre.yaml").toString(), quick.toString());
        assertEquals(Main.OK, r.code(), "warnings do not fail the check");
        assertTrue(r.err().contains("quick.rules:2:43: warning: hold time 20s is shorter than the 1m reporting interval of cow-shed.dry-bulb"),
                r.err());
    }

    @Test
    void aSensorReportingCloseToItsZonesMaxAgeIsWarnedAbout() throws Exception {
        Files.createDirectories(dir.resolve("rules.d"));
        Files.writeString(dir.resolve("rules.d/heat.rules"),
                "watch heat\n  raise when cow-shed.thi >= 75 for 30m\n  clear when cow-shed.thi <= 73 for 30m\n  notify office\n");
        Path cfg = Files.writeString(dir.resolve("byre.yaml"), Files.readString(config())
                .replace("sensors: [shed-dry, shed-rh] }", "sensors: [shed-dry, shed-rh], max-age: 5m }"));
        // A battery dry-bulb sensor every 5 minutes, RH every minute.
        Instant now = Instant.now();
        try (HistoryStore store = HistoryStore.open(dir.resolve("history.db"))) {
            HistoryWriter w = HistoryWriter.start(store, Retention.DEFAULT, Clock.systemUTC());
            for (int i = 60; i > 0; i--) {
                if (i % 5 == 0) w.append(StreamKey.sensor("shed-dry"), now.minusSeconds(60L * i), 20.0 + i * 0.01);
                w.append(StreamKey.sensor("shed-rh"), now.minusSeconds(60L * i + 7), 60.0);
            }
            w.close();
        }
        CliRun r = CliRun.of("check", "--config", cfg.toString());
        assertEquals(Main.OK, r.code(), r.err());
        assertTrue(r.err().contains("warning: stream cow-shed.dry-bulb (sensor shed-dry) reports every 5m, close to or above the max-age"
                + " of zone cow-shed (5m): one late or missed reading leaves it without data"), r.err());
        assertTrue(r.err().contains("set 'max-age: 13m' for zone cow-shed"), r.err());
        assertTrue(!r.err().contains("sensor shed-rh"), "a 1-minute sensor is fine with 5m: " + r.err());
        assertTrue(r.out().contains("1 warning."), r.out());

        // Without a max-age in the file the zone follows its sensors (12m30s here): nothing to warn about.
        Files.writeString(cfg, Files.readString(cfg).replace(", max-age: 5m }", " }"));
        CliRun learnt = CliRun.of("check", "--config", cfg.toString());
        assertEquals(Main.OK, learnt.code(), learnt.err());
        assertTrue(learnt.out().contains("0 warnings"), learnt.out() + learnt.err());
    }

    @Test
    void acceptingAcknowledgementsOverAnOpenBrokerIsWarnedAbout() throws Exception {
        Files.createDirectories(dir.resolve("rules.d"));
        String plain = Files.readString(config());
        Path open = Files.writeString(dir.resolve("open.yaml"), plain.replace("site: larkmoor\n",
                "site: larkmoor\nmqtt:\n  broker: embedded\n  accept-acks: true\n"));
        CliRun r = CliRun.of("check", "--config", open.toString());
        assertEquals(Main.OK, r.code(), r.err());
        assertTrue(r.err().contains(open + ": warning: mqtt.accept-acks is on with the embedded broker, which lets any program on this "
                + "machine connect without a password and acknowledge (silence) alerts"), r.err());

        Files.writeString(dir.resolve("mqtt.secret"), "pw\n");
        Path closed = Files.writeString(dir.resolve("closed.yaml"), plain.replace("site: larkmoor\n",
                "site: larkmoor\nmqtt:\n  broker: tcp://127.0.0.1:1883\n  username: byre\n  password-file: mqtt.secret\n  accept-acks: true\n"));
        CliRun quiet = CliRun.of("check", "--config", closed.toString());
        assertEquals(Main.OK, quiet.code(), quiet.err());
        assertFalse(quiet.err().contains("accept-acks"), quiet.err());
        CliRun off = CliRun.of("check", "--config", config().toString());
        assertFalse(off.err().contains("accept-acks"), off.err());
    }
}
