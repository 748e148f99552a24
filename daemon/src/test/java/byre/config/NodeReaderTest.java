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

/** The typed readers on their own: each wrong value is one problem at its line and column, and a fallback lets reading go on. */
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
                "barn.yaml:2:6: mqtt.qos must be a single value, not a list",
                "barn.yaml:3:16: mqtt.publish-every must be a duration such as 30s, 20m, 2h, 14d or 5y, not 'soon'",
                "barn.yaml:4:10: mqtt.retries must be a whole number, not 'three'"), problems());
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
                "barn.yaml:2:1: unknown key 'lisen' in mqtt (did you mean 'listen'?)",
                "barn.yaml:3:1: unknown key 'colour' in mqtt"), problems());
    }

    @Test
    void theColumnIsThatOfTheWrongValueTheUnknownKeyOrTheMappingThatLacksAKey() {
        Map<String, Node> top = reader.mapping(yaml("""
                mqtt:
                  lisen: 127.0.0.1:1884
                  qos:   [0, 1]
                notify:
                  night-phone: { type: webhook }
                """), null, "top level");
        Map<String, Node> mqtt = reader.mapping(top.get("mqtt"), NodeReader.ordered("listen", "qos"), "mqtt");
        reader.integer(mqtt.get("qos"), "mqtt.qos", 1);
        Node phone = reader.mapping(top.get("notify"), null, "notify").get("night-phone");
        reader.problem(phone, "webhook channel night-phone is missing 'url'");
        List<ConfigProblem> p = reader.problems();
        assertEquals(List.of(2, 3), List.of(p.get(0).line(), p.get(0).column()), "the unknown key, not its value");
        assertEquals(List.of(3, 10), List.of(p.get(1).line(), p.get(1).column()), "the value, not its key");
        assertEquals(List.of(5, 16), List.of(p.get(2).line(), p.get(2).column()), "the mapping that lacks the key");
        assertEquals(List.of(
                "barn.yaml:2:3: unknown key 'lisen' in mqtt (did you mean 'listen'?)",
                "barn.yaml:3:10: mqtt.qos must be a single value, not a list",
                "barn.yaml:5:16: webhook channel night-phone is missing 'url'"), problems());
    }

    @Test
    void aProblemWithNoPlaceInTheFileNamesOnlyTheFile() {
        reader.problem(null, "cannot read the configuration: no such file");
        assertEquals(List.of("barn.yaml: cannot read the configuration: no such file"), problems());
    }

    @Test
    void aValueInAListIsFoundAtItsOwnColumn() {
        Map<String, Node> m = reader.mapping(yaml("zones: [cow-shed, calf-pen-1]\ngroups: dairy\n"), null, "site");
        List<NodeReader.Item> zones = reader.items(m.get("zones"), "zones");
        assertEquals(List.of("cow-shed", "calf-pen-1"), zones.stream().map(NodeReader.Item::value).toList());
        reader.problem(zones.get(1).node(), "site lists zone calf-pen-1 twice");
        reader.problem(reader.items(m.get("groups"), "groups").get(0).node(), "group 'dairy' is taken");
        assertEquals(List.of("barn.yaml:1:19: site lists zone calf-pen-1 twice", "barn.yaml:2:9: group 'dairy' is taken"), problems());
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
        assertEquals(List.of("barn.yaml:2:10: sensors must be a list such as [a, b]"), problems());
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
        assertEquals(List.of(new ConfigProblem("barn.yaml", 2, 13, "mqtt.other-file: " + dir.resolve("empty.secret") + " is empty")),
                inDir.problems());
    }
}
