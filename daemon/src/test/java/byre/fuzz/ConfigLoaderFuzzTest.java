package byre.fuzz;

import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

import byre.config.ConfigException;
import byre.config.ConfigLoader;
import byre.config.ConfigProblem;
import byre.testing.Configs;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * Seeded mutation fuzzing of the configuration loader: whatever the text, {@link ConfigLoader#parse} gives a
 * configuration or a {@link ConfigException} listing problems with a message each; nothing else may escape.
 */
class ConfigLoaderFuzzTest {
    @TempDir
    Path dir;

    static final String LARKMOOR = """
            site: larkmoor
            timezone: Europe/London
            units: metric
            mqtt:
              broker: tcp://127.0.0.1:1883
              listen: 127.0.0.1:1884
              client-id: byre-larkmoor
              username: byre
              password-file: mqtt.secret
              publish-prefix: byre
              qos: 1
            sensors:
              pen1-dry:  { topic: larkmoor/calf-barn/pen1/dry, quantity: dry-bulb, unit: F }
              pen1-wet:  { topic: larkmoor/calf-barn/pen1/wet, quantity: wet-bulb, unit: F }
              pen1-air:  { topic: larkmoor/calf-barn/pen1/air, quantity: air-speed, unit: ft/min, payload: "json:speed", time: "json:ts" }
              pens-dry:  { topic: larkmoor/calf-barn/+/dry2, quantity: dry-bulb, id-level: 3 }
              shed-rh:   { topic: larkmoor/cow-shed/climate, quantity: rh, unit: "%", payload: "senml:rh" }
              shed-p:    { topic: larkmoor/cow-shed/p, quantity: pressure, unit: hPa }
            zones:
              calf-pen-1:
                groups: [calves]
                sensors: [pen1-dry, pen1-wet, pen1-air]
                elevation: 240 m
                psychrometer: aspirated
                max-age: 5m
                thi: nrc-1971
              cow-shed:
                groups: [cows]
                sensors: [shed-rh, shed-p]
                elevation: 800 ft
            notify:
              night-phone: { type: webhook, url: "https://push.example/hook", secret-file: hook.secret, timeout: 10s }
              barn-siren:  { type: mqtt, topic: larkmoor/calf-barn/siren/set, retain: true }
              office:      { type: email, smtp: "smtp.example:587", from: byre@example, to: [office@example] }
              pager-script: { type: command, argv: [/bin/true, "+440000000000"] }
            rules: [rules.d/heat.rules, rules.d/cold.rules]
            history:
              path: history.db
              keep-raw: 14d
              keep-minute: 90d
              keep-hour: 5y
            admin:
              listen: 127.0.0.1:9466
              token-file: admin.token
            """;
    static final String SMALL = """
            site: larkmoor
            mqtt: { broker: embedded, listen: "127.0.0.1:0" }
            sensors:
              a: { topic: t/a, quantity: dry-bulb }
              b: { topic: t/b, quantity: rh, payload: "json:x.y" }
            zones:
              z: { sensors: [a, b] }
            rules: rules.d
            history: { path: h.db }
            """;
    static final String[] YAML_TOKENS = {":", ": ", "- ", "\n", "\n  ", "\n    ", "\t", "{", "}", "[", "]", ",", "\"", "'", "#",
            "&a ", "*a", "<<: *a", "!!binary ", "!!int ", "!!float ", "!!map ", "!!seq ", "!custom ", "? ", "|\n  ", ">-\n  ",
            "---\n", "...\n", "%YAML 1.2\n", "~", "null", "true", ".inf", ".nan", "-.inf", "0o17", "0x1F", "1e999", "99999999999",
            "-1", "\u0000", "\u00ff", "\ufeff", "\ud83d\udc04", "site: x\n", "sensors:\n", "zones:\n", "quantity: ", "unit: ",
            "payload: ", "json:", "senml:", "+", "#", "/", "elevation: ", " m", " ft", "max-age: ", "keep-raw: ", "0s", "1d",
            "999999999999d", "type: ", "webhook", "argv: ", "listen: ", "127.0.0.1:", "65536", "id-level: ", "groups: ", "@",
            "${HOME}", "../../", "/dev/null", "%", "\\"};

    @BeforeEach
    void secrets() throws Exception {
        Files.writeString(dir.resolve("mqtt.secret"), "s3cret\n");
        Files.writeString(dir.resolve("hook.secret"), "hook\n");
        Files.writeString(dir.resolve("admin.token"), "tok\n");
        Files.createDirectories(dir.resolve("rules.d"));
        Files.writeString(dir.resolve("rules.d/heat.rules"), "# empty\n");
        Files.writeString(dir.resolve("rules.d/cold.rules"), "# empty\n");
    }

    /** Parses; returns a failure description, or null when the contract held. */
    String check(String text) {
        try {
            assertNotNull(Configs.parse("byre.yaml", text, dir, Map.of("BYRE_MQTT_PASSWORD", "x")::get));
            return null;
        } catch (ConfigException e) {
            if (e.problems().isEmpty()) return "ConfigException without problems";
            for (ConfigProblem p : e.problems()) {
                if (p.toString() == null || p.toString().isBlank()) return "a problem without a message";
                if (p.toString().contains("s3cret")) return "a secret leaked into a message: " + p;
            }
            return null;
        } catch (RuntimeException | StackOverflowError e) {
            return Mutator.thrown(e);
        }
    }

    @Test
    void mutatedConfigurationsGiveProblemsNotExceptions() {
        long seed = Mutator.seed(81);
        Mutator m = new Mutator(seed, List.of(LARKMOOR, SMALL), YAML_TOKENS, "- a%d:\n  ", "");
        int valid = 0;
        for (int i = 0; i < Mutator.iterations(); i++) {
            byte[] input = m.next();
            // The loader takes text: invalid UTF-8 becomes U+FFFD, as Files.readString would refuse it earlier.
            String text = new String(input, StandardCharsets.UTF_8);
            String problem = check(text);
            if (problem != null) fail("input #" + i + " (seed " + seed + ") " + Mutator.literal(input) + ": " + problem);
            if (problem == null && validates(text)) valid++;
        }
        assertTrue(valid > 0, "no mutated configuration was valid at all: the fuzzer only exercised the YAML parser");
    }

    private boolean validates(String text) {
        try {
            Configs.parse("byre.yaml", text, dir, n -> null);
            return true;
        } catch (ConfigException e) {
            return false;
        }
    }

    @Test
    void theCorpusIsValid() {
        assertTrue(validates(LARKMOOR), check(LARKMOOR));
        assertTrue(validates(SMALL), check(SMALL));
        assertFalse(validates(LARKMOOR.replace("dry-bulb", "dry-bulp")));
    }
}
