package byre.config;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.testing.Configs;
import byre.units.Quantity;
import byre.units.Unit;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

class ConfigLoaderTest {
    @TempDir
    Path dir;

    static final String GOOD = """
            site: larkmoor
            timezone: Europe/London
            units: metric
            mqtt:
              broker: embedded
              listen: 127.0.0.1:1884
              client-id: byre-larkmoor
              publish-prefix: byre
            sensors:
              pen1-dry:  { topic: barn/east/pen1/dry, quantity: dry-bulb, unit: F }
              pen1-wet:  { topic: barn/east/pen1/wet, quantity: wet-bulb, unit: F }
              pen1-air:  { topic: barn/east/pen1/air, quantity: air-speed, unit: ft/min, payload: "json:speed" }
              shed-rh:   { topic: barn/shed/rh, quantity: rh, payload: "senml:rh" }
            zones:
              calf-pen-1:
                groups: [calves]
                sensors: [pen1-dry, pen1-wet, pen1-air]
                elevation: 240 m
                psychrometer: aspirated
                max-age: 5m
              cow-shed:
                groups: [cows]
                sensors: [shed-rh]
            notify:
              barn-siren: { type: mqtt, topic: barn/siren/set }
            rules: rules.d
            history:
              path: history.db
              keep-raw: 14d
            """;

    ByreConfig parse(String text) throws ConfigException {
        return Configs.parse("byre.yaml", text, dir, name -> null);
    }

    List<String> problems(String text) {
        ConfigException e = assertThrows(ConfigException.class, () -> parse(text));
        return e.problems().stream().map(ConfigProblem::toString).toList();
    }

    @Test
    void readsTheDesignExample() throws Exception {
        ByreConfig c = parse(GOOD);
        assertEquals("larkmoor", c.site());
        assertEquals("tcp://127.0.0.1:1884", c.mqtt().connectUri());
        SensorConfig air = c.sensors().get("pen1-air");
        assertEquals(Quantity.AIR_SPEED, air.quantity());
        assertEquals(Unit.FT_PER_MIN, air.unit());
        assertEquals(new PayloadFormat(PayloadFormat.Kind.JSON, "speed"), air.payload());
        assertEquals(Unit.PERCENT, c.sensors().get("shed-rh").unit(), "default unit is the canonical one");
        ZoneConfig pen = c.zones().get("calf-pen-1");
        assertEquals(240.0, pen.elevationM());
        assertEquals(Duration.ofMinutes(5), pen.maxAge());
        assertTrue(Double.isNaN(c.zones().get("cow-shed").elevationM()));
        assertEquals(dir.resolve("history.db"), c.history().path());
        assertEquals(Duration.ofDays(90), c.history().keepMinute(), "default");
        assertEquals(Duration.ofSeconds(2), c.history().commitEvery(), "default");
        assertEquals(List.of(dir.resolve("rules.d")), c.rulePaths());
        assertEquals("mqtt", c.channels().get("barn-siren").type());
    }

    @ParameterizedTest(name = "{0}")
    @CsvSource(delimiter = '|', textBlock = """
            unknown top key          | sitee: x                                       | byre.yaml:1:1: unknown key 'sitee' in top level (did you mean 'site'?)
            unknown unit             | sensors:\\n  a: { topic: t/a, quantity: dry-bulb, unit: Fahr }   | byre.yaml:2:46: unknown unit 'Fahr' (did you mean 'F'?); known units: C F K % m/s km/h mph ft/min kPa hPa Pa mbar inHg W/m2 g/kg kJ/kg
            unit of wrong dimension  | sensors:\\n  a: { topic: t/a, quantity: dry-bulb, unit: kPa }    | byre.yaml:2:46: unit 'kPa' does not measure dry-bulb (use one of C F K)
            unknown quantity         | sensors:\\n  a: { topic: t/a, quantity: dry-blub }               | byre.yaml:2:30: unknown quantity 'dry-blub' (did you mean 'dry-bulb'?); a sensor measures one of dry-bulb, wet-bulb, rh, dew-point, air-speed, solar, globe, pressure
            duplicate topic          | sensors:\\n  a: { topic: t/a, quantity: rh }\\n  b: { topic: t/a, quantity: rh } | byre.yaml:3:15: duplicate topic 't/a': already used by sensor a
            bad sensor id (its key)  | sensors:\\n  'pen 1':\\n    { topic: t/a, quantity: rh } | byre.yaml:2:3: sensor id 'pen 1' must be letters, digits, '-', '_' or '.'
            zone unknown sensor      | sensors:\\n  pen1-dry: { topic: t/a, quantity: dry-bulb }\\nzones:\\n  z: { sensors: [pen1-dyr] } | byre.yaml:4:18: zone z names unknown sensor 'pen1-dyr' (did you mean 'pen1-dry'?)
            wrong type               | mqtt: [a, b]                                   | byre.yaml:1:7: mqtt must be a mapping of keys, not a list
            bad qos                  | mqtt:\\n  qos: two                             | byre.yaml:2:8: mqtt.qos must be a whole number, not 'two'
            bad duration             | history:\\n  keep-raw: fortnight               | byre.yaml:2:13: history.keep-raw must be a duration such as 30s, 20m, 2h, 14d or 5y, not 'fortnight'
            commit interval too long | history:\\n  commit-every: 5m                 | byre.yaml:2:17: history.commit-every must be at most 1m: readings not yet committed are held only by the broker, whose in-flight window and queue must hold that many
            channel missing field    | notify:\\n  night-phone: { type: webhook }     | byre.yaml:2:16: webhook channel night-phone is missing 'url'
            unknown channel type     | notify:\\n  n: { type: webhok, url: x }        | byre.yaml:2:14: unknown channel type 'webhok' (did you mean 'webhook'?); one of webhook, mqtt, email, command
            bad time zone            | timezone: Europe/Londn                          | byre.yaml:1:11: unknown time zone 'Europe/Londn' (did you mean 'Europe/London'?); use a region name such as Europe/London
            wildcard without level   | sensors:\\n  a: { topic: barn/+/dry, quantity: dry-bulb } | byre.yaml:2:15: topic 'barn/+/dry' has wildcards: add id-level: N (the topic level, from 1, that names each sensor)
            bad payload form         | sensors:\\n  a: { topic: t/a, quantity: rh, payload: xml }  | byre.yaml:2:43: payload must be number, json:<dotted.path> or senml:<name>, not 'xml'
            bad broker               | mqtt:\\n  broker: http://x                     | byre.yaml:2:11: mqtt.broker must be 'embedded', tcp://host:port or ssl://host:port, not 'http://x'
            missing secret file      | mqtt:\\n  password-file: nothere.secret        | byre.yaml:2:18: mqtt.password-file: cannot read DIR/nothere.secret (no such file)
            not yaml                 | site: [unclosed                                 | byre.yaml:1:16: not valid YAML: expected ',' or ']'
            """)
    void reportsEachProblemWithFileLineAndColumn(String name, String yaml, String expected) {
        String snippet = yaml.replace("\\n", "\n");
        // 'site:' goes last so that the expected line numbers count from the snippet.
        List<String> got = problems(snippet.matches("(?s)^site:.*") ? snippet : snippet + "\nsite: larkmoor\n");
        String want = expected.replace("DIR", dir.toString());
        assertTrue(got.stream().anyMatch(p -> p.startsWith(want)), () -> "expected " + want + "\n got " + got);
    }

    @Test
    void listsEveryProblemAtOnce() {
        List<String> got = problems("""
                site: larkmoor
                colour: blue
                sensors:
                  a: { topic: t/a, quantity: rh, unit: F }
                zones:
                  z: { sensors: [b] }
                """);
        assertEquals(3, got.size(), got.toString());
    }

    @Test
    void secretsComeFromFilesAndNeverPrint() throws Exception {
        Files.writeString(dir.resolve("mqtt.secret"), "hunter2-barn\n");
        ByreConfig c = parse("site: larkmoor\nmqtt:\n  username: byre\n  password-file: mqtt.secret\n");
        assertEquals("hunter2-barn", c.mqtt().password().reveal());
        assertFalse(c.toString().contains("hunter2"), "the configuration's text form must not show secrets");
    }

    @Test
    void secretsFromTheEnvironment() throws Exception {
        ByreConfig c = Configs.parse("byre.yaml", "site: x\nmqtt:\n  password-env: BYRE_MQTT_PASSWORD\n", dir,
                Map.of("BYRE_MQTT_PASSWORD", "s3cret")::get);
        assertEquals("s3cret", c.mqtt().password().reveal());
        assertEquals(List.of("byre.yaml:3:17: mqtt.password-env names $NOPE, which is not set"),
                problems("site: x\nmqtt:\n  password-env: NOPE\n"));
    }

    @Test
    void wildcardFamiliesNameSensorsByTopicLevel() throws Exception {
        ByreConfig c = parse("""
                site: x
                sensors:
                  pens-dry: { topic: barn/+/dry, quantity: dry-bulb, id-level: 2 }
                zones:
                  pen3: { sensors: [pens-dry/pen3] }
                """);
        assertTrue(c.sensors().get("pens-dry").isFamily());
    }

    @Test
    void theEmbeddedBrokerListensOnLoopbackOnlyAndAcceptingAcksIsOffUnlessSaid() throws Exception {
        String base = "site: larkmoor\nmqtt:\n  broker: embedded\n  listen: %s\n%s";
        assertEquals(List.of("byre.yaml:4:11: mqtt.listen '0.0.0.0:1883': the embedded broker listens on loopback only (127.0.0.1 or ::1); "
                + "it has no users and is for the demo, tests and one-machine trials. For sensors on the farm network use the barn's "
                + "mosquitto (mqtt.broker: tcp://127.0.0.1:1883)"), problems(base.formatted("0.0.0.0:1883", "")));
        assertEquals(1, problems(base.formatted("192.168.1.20:1883", "")).size());
        assertFalse(parse(base.formatted("127.0.0.1:1883", "")).mqtt().acceptAcks(), "off by default");
        assertTrue(parse(base.formatted("'[::1]:1883'", "  accept-acks: true\n")).mqtt().acceptAcks());
        assertEquals(List.of("byre.yaml:5:16: mqtt.accept-acks must be true or false, not 'maybe'"),
                problems(base.formatted("127.0.0.1:1883", "  accept-acks: maybe\n")));
        // A LAN address is fine for a real broker: listen is then unused.
        parse("site: larkmoor\nmqtt:\n  broker: tcp://192.168.1.5:1883\n  listen: 0.0.0.0:1883\n");
    }
}
