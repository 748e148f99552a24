package byre.daemon;

import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.config.ByreConfig;
import byre.testing.Configs;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Instant;
import java.time.ZoneOffset;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** On reload, a rule file naming a stream the zone can never have is refused like any other error (the old rules stay). */
class RuleLoaderStreamsTest {
    @TempDir
    Path dir;

    @Test
    void aWatchOnAStreamThatCanNeverExistIsRefusedOnReload() throws Exception {
        Files.createDirectories(dir.resolve("rules.d"));
        Path rules = Files.writeString(dir.resolve("rules.d/shed.rules"),
                "watch hot\n  raise when cow-shed.heat-index > 30 C\n  clear when cow-shed.heat-index < 28 C\n  notify office\n");
        ByreConfig config = Configs.parse("byre.yaml", """
                site: larkmoor
                sensors:
                  shed-dry: { topic: t/dry, quantity: dry-bulb }
                  shed-rh: { topic: t/rh, quantity: rh }
                zones:
                  cow-shed: { sensors: [shed-dry, shed-rh] }
                notify:
                  office: { type: command, argv: [/bin/true] }
                rules: rules.d
                history: { path: history.db }
                """, dir, k -> null);
        RuleLoader loader = new RuleLoader(config, Clock.fixed(Instant.parse("2026-07-14T13:00:00Z"), ZoneOffset.UTC));
        assertTrue(loader.load().isPresent(), "heat index comes from dry bulb and rh");

        Files.writeString(rules, "watch hot\n  raise when cow-shed.cci > 30 C\n  clear when cow-shed.cci < 28 C\n  notify office\n");
        assertTrue(loader.changed());
        assertTrue(loader.load().isEmpty(), "cci needs an air-speed sensor the shed does not have");
    }
}
