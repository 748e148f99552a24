package byre.config;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertSame;

import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.snakeyaml.engine.v2.api.LoadSettings;
import org.snakeyaml.engine.v2.api.lowlevel.Compose;
import org.snakeyaml.engine.v2.nodes.Node;

/** The typed readers on their own: each wrong value is one problem at its line, and a fallback lets reading go on. */
class NodeReaderTest {
    @TempDir
    Path dir;

    final NodeReader reader = new NodeReader("barn.yaml", null);

    static Node yaml(String text) {
        return new Compose(LoadSettings.builder().build()).composeString(text).orElseThrow();
    }

    List<String> problems() {
        return reader.problems().stream().map(ConfigProblem::toString).toList();
    }

    @Test
    void aValueOfTheWrongTypeIsAProblemAtItsLineAndGivesTheFallback() {
        Map<String, Node> m = reader.mapping(yaml("""
                broker: embedded
                qos: [0, 1]
                publish-every: soon
                retries: three
                """), null, "mqtt");
        assertEquals(1, reader.integer(m.get("qos"), "mqtt.qos", 1));
        assertEquals(Duration.ofSeconds(1), reader.duration(m.get("publish-every"), "mqtt.publish-every", Duration.ofSeconds(1)));
        assertEquals(5, reader.integer(m.get("retries"), "mqtt.retries", 5));
        assertEquals("embedded", reader.string(m.get("broker"), "mqtt.broker", null));
        assertEquals(List.of(
                "barn.yaml:2: mqtt.qos must be a single value, not a list",
                "barn.yaml:3: mqtt.publish-every must be a duration such as 30s, 20m, 2h, 14d or 5y, not 'soon'",
                "barn.yaml:4: mqtt.retries must be a whole number, not 'three'"), problems());
    }

    @Test
    void anUnknownKeyIsAProblemWithTheNearestKnownKeyAndIsLeftOut() {
        Map<String, Node> m = reader.mapping(yaml("""
                broker: embedded
                lisen: 127.0.0.1:1884
                colour: red
                """), NodeReader.ordered("broker", "listen"), "mqtt");
        assertEquals(List.of("broker"), List.copyOf(m.keySet()));
        assertEquals(List.of(
                "barn.yaml:2: unknown key 'lisen' in mqtt (did you mean 'listen'?)",
                "barn.yaml:3: unknown key 'colour' in mqtt"), problems());
    }

    @Test
    void aMessageAboutAKeyPointsAtTheKeyNotAtItsValue() {
        Map<String, Node> m = reader.mapping(yaml("""
                sensors:
                  - pen1-dry
                """), null, "zone calf-pen-1");
        Node key = reader.keyOf(m.get("sensors"));
        assertEquals(1, NodeReader.line(key));
        assertEquals(2, NodeReader.line(m.get("sensors")));
        Node stray = yaml("x");
        assertSame(stray, reader.keyOf(stray), "a node not read from a mapping stands for itself");
    }

    @Test
    void oneWordIsAListOfOneAndAMappingIsNotAList() {
        Map<String, Node> m = reader.mapping(yaml("""
                groups: calves
                sensors: { a: b }
                """), null, "zone");
        assertEquals(List.of("calves"), reader.stringList(m.get("groups"), "groups"));
        assertEquals(List.of(), reader.stringList(m.get("sensors"), "sensors"));
        assertEquals(List.of("barn.yaml:2: sensors must be a list such as [a, b]"), problems());
    }

    @Test
    void aSecretFileIsReadRelativeToTheConfigurationAndAnEmptyOneIsAProblem() throws Exception {
        NodeReader inDir = new NodeReader("barn.yaml", dir);
        Files.writeString(dir.resolve("mqtt.secret"), "  hay-loft-7\n");
        Files.writeString(dir.resolve("empty.secret"), "\n");
        Map<String, Node> m = inDir.mapping(yaml("""
                password-file: mqtt.secret
                other-file: empty.secret
                """), null, "mqtt");
        assertEquals("hay-loft-7", inDir.secretFile(m.get("password-file"), "mqtt.password-file").reveal());
        assertNull(inDir.secretFile(m.get("other-file"), "mqtt.other-file"));
        assertEquals(List.of(new ConfigProblem("barn.yaml", 2, "mqtt.other-file: " + dir.resolve("empty.secret") + " is empty")),
                inDir.problems());
    }
}
