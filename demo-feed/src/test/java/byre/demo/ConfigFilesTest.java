package byre.demo;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.junit.jupiter.api.Test;

/** The demo configuration and the operator's example must describe exactly the sensors the simulator has. */
class ConfigFilesTest {

    /** Keys of the configuration (README, Configuration), in order, each as "indent+key:". */
    private static final List<String> DESIGN_KEYS = List.of(
            "site:", "timezone:", "units:", "mqtt:", "  broker:", "  listen:", "  client-id:", "  username:",
            "  password-file:", "  publish-prefix:", "sensors:", "zones:", "    groups:", "    sensors:",
            "    elevation:", "    psychrometer:", "    max-age:", "notify:", "rules:", "history:", "  path:",
            "  keep-raw:", "  keep-minute:", "  keep-hour:", "admin:", "  listen:", "  token-file:");

    private static final List<String> SECRET_KEYS = List.of("  username:", "  password-file:", "  token-file:");

    static String example() throws IOException {
        return Files.readString(Path.of("..", "config", "byre.example.yaml"), StandardCharsets.UTF_8);
    }

    @Test
    void bothFilesListEverySimulatedSensorExactly() throws IOException {
        for (String text : List.of(DemoConfig.text(), example())) {
            List<String> lines = new ArrayList<>();
            boolean inSensors = false;
            for (String line : text.split("\n")) {
                if (line.startsWith("sensors:")) { inSensors = true; continue; }
                if (inSensors && !line.isEmpty() && !line.startsWith(" ")) break;
                if (inSensors && line.startsWith("  ") && !line.trim().startsWith("#")) lines.add(line.replaceAll("\\s+#.*$", "").trim());
            }
            List<String> expected = LarkmoorFarm.sensors().stream().map(SimSensor::yamlLine).toList();
            assertEquals(expected, lines);
        }
    }

    @Test
    void zonesListTheSensorsOfTheirZoneAndTheRightGroup() throws IOException {
        for (String text : List.of(DemoConfig.text(), example())) {
            Map<String, String> zoneSensors = new LinkedHashMap<>();
            Matcher m = Pattern.compile("(?m)^  ([a-z0-9-]+):\\n    groups: \\[(\\w+)][^\\n]*\\n    sensors: \\[([^]]+)]").matcher(text);
            while (m.find()) {
                zoneSensors.put(m.group(1), m.group(3));
                assertEquals(m.group(1).startsWith("calf") ? "calves" : "cows", m.group(2));
            }
            assertEquals(List.of("calf-pen-1", "calf-pen-2", "cow-shed"), new ArrayList<>(zoneSensors.keySet()));
            for (var e : zoneSensors.entrySet()) {
                List<String> expected = LarkmoorFarm.sensors().stream().filter(s -> s.zone().equals(e.getKey())).map(SimSensor::id).toList();
                assertEquals(String.join(", ", expected), e.getValue());
            }
        }
    }

    @Test
    void theExampleHasEveryKeyOfTheDesignInOrderAndTheDemoAllButSecrets() throws IOException {
        assertKeysInOrder(example(), DESIGN_KEYS);
        List<String> demoKeys = new ArrayList<>(DESIGN_KEYS);
        demoKeys.removeAll(SECRET_KEYS);
        assertKeysInOrder(DemoConfig.text(), demoKeys);
        assertTrue(example().contains("\n  broker: tcp://127.0.0.1:1883 ") && example().contains("# broker: embedded"),
                "points at the barn's mosquitto and shows byre's own broker for trials");
        assertTrue(DemoConfig.text().contains("broker: embedded"));
        assertTrue(example().contains("path: /var/lib/byre/history.db"));
    }

    @Test
    void theDemoFillsInPortsAndPaths() {
        String y = DemoConfig.yaml(18830, 19466, Path.of("/tmp/demo x/rules.d"), Path.of("/tmp/demo x/history.db"));
        assertTrue(y.contains("\n  listen: 127.0.0.1:18830\n"), y);
        assertTrue(y.contains("\n  listen: 127.0.0.1:19466\n"), y);
        assertTrue(y.contains("\nrules: \"/tmp/demo x/rules.d\"\n"), y);
        assertTrue(y.contains("\n  path: \"/tmp/demo x/history.db\"\n"), y);
        assertFalse(y.contains(":1883\n") || y.contains(":9466\n") || y.contains("history.db ") || y.contains("rules.d "), y);
        assertEquals("\"C:\\\\byre \\\"x\\\"\"", DemoConfig.quoted("C:\\byre \"x\""));
    }

    private static void assertKeysInOrder(String text, List<String> keys) {
        int from = 0;
        for (String k : keys) {
            // An optional key may be shown commented out ("  # username: byre"): it is still documented in place.
            String indent = k.substring(0, k.length() - k.stripLeading().length());
            Matcher m = Pattern.compile("(?m)^(" + Pattern.quote(k) + "|" + Pattern.quote(indent + "# " + k.strip()) + ")").matcher(text);
            assertTrue(m.find(from), "key '" + k.trim() + "' missing or out of order");
            from = m.end();
        }
    }
}
