package byre.demo;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.time.Duration;
import java.util.HashMap;
import java.util.HashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;
import org.junit.jupiter.api.Test;

class LoadMainTest {

    @ParameterizedTest
    @ValueSource(ints = {0, 1})
    void publishesRoundRobinOverTheConfiguredSensors(int qos) throws Exception {
        try (TinyBroker broker = new TinyBroker()) {
            LoadMain.Options o = LoadMain.Options.parse("--broker", broker.uri(), "--sensors", "7", "--zones", "3",
                    "--qos", Integer.toString(qos), "--count", "700", "--duration", "1h", "--topic-prefix", "bench",
                    "--inflight", "50");
            ByteArrayOutputStream text = new ByteArrayOutputStream();
            LoadMain.Result r = LoadMain.run(o, new PrintStream(text, true, StandardCharsets.UTF_8));
            assertEquals(700, r.sent());
            assertEquals(700, r.completed());
            assertEquals(0, r.failed());
            assertTrue(text.toString(StandardCharsets.UTF_8).startsWith("sent 700, completed 700, failed 0 in "), text.toString());

            // the server may still be reading the last QoS 0 packets when run() returns
            for (int i = 0; i < 200 && broker.received().size() < 700; i++) Thread.sleep(10);
            List<TinyBroker.Received> got = broker.received();
            assertEquals(700, got.size());
            Map<String, Integer> perTopic = new HashMap<>();
            Map<String, Long> lastTs = new HashMap<>();
            long before = System.currentTimeMillis();
            for (int i = 0; i < got.size(); i++) {
                TinyBroker.Received m = got.get(i);
                // payload times are the clock's, strictly rising per sensor (flat out, 100 readings of a sensor run at
                // most 100 ms ahead of it)
                long ts = Long.parseLong(m.payload().replaceAll(".*\"ts\":(\\d+)}", "$1"));
                assertTrue(ts <= before + 100 && ts > before - 60_000, m.payload());
                Long prev = lastTs.put(m.topic(), ts);
                assertTrue(prev == null || ts > prev, m.payload() + " after " + prev);
                assertEquals(LoadConfig.topic("bench", i % 7, 7, 3), m.topic());
                assertTrue(m.payload().matches("\\{\"v\":-?\\d+\\.\\d\\d,\"ts\":\\d{13}}"), m.payload());
                assertEquals(qos, m.qos());
                perTopic.merge(m.topic(), 1, Integer::sum);
            }
            assertEquals(Set.of(100), new HashSet<>(perTopic.values()));
        }
    }

    @Test
    void topicsAndNamesFollowTheDocumentedLayout() {
        assertEquals("load/z01/s0001", LoadConfig.topic("load", 0, 1000, 10));
        assertEquals("load/z10/s0010", LoadConfig.topic("load", 9, 1000, 10));
        assertEquals("load/z01/s0011", LoadConfig.topic("load", 10, 1000, 10));
        assertEquals("dry-bulb", LoadConfig.quantityOf(9, 10));
        assertEquals("rh", LoadConfig.quantityOf(10, 10));
        assertEquals("air-speed", LoadConfig.quantityOf(25, 10));
        assertEquals("dry-bulb", LoadConfig.quantityOf(30, 10));
    }

    @Test
    void theConfigurationListsEverySensorOnceInItsZone() {
        String y = LoadConfig.yaml(10, 4, "tcp://127.0.0.1:1883", null, "load", Path.of("r"), Path.of("/tmp/h.db"));
        Matcher s = Pattern.compile("(?m)^  (s\\d+): \\{ topic: (\\S+), quantity: ([a-z-]+), unit: (\\S+), payload: \"json:v\", time: \"json:ts\" }$").matcher(y);
        Map<String, String> topics = new HashMap<>();
        while (s.find()) topics.put(s.group(1), s.group(2));
        assertEquals(10, topics.size());
        for (int i = 0; i < 10; i++) assertEquals(LoadConfig.topic("load", i, 10, 4), topics.get(LoadConfig.sensorId(i, 10)));
        Matcher z = Pattern.compile("(?m)^  (z\\d+):\\n    groups: \\[load]\\n    sensors: \\[([^]]*)]").matcher(y);
        Set<String> listed = new HashSet<>();
        int zones = 0;
        while (z.find()) {
            zones++;
            for (String id : z.group(2).split(", ")) {
                assertTrue(listed.add(id), id + " listed twice");
                assertEquals(z.group(1), LoadConfig.zoneId(LoadConfig.zoneOf(Integer.parseInt(id.substring(1)) - 1, 4), 4));
            }
        }
        assertEquals(4, zones);
        assertEquals(topics.keySet(), listed);
        assertTrue(y.contains("\n  broker: tcp://127.0.0.1:1883\n"));
        assertTrue(y.contains("\n  path: \"/tmp/h.db\"\n"));
        assertTrue(LoadConfig.yaml(3, 1, "embedded").contains("\n  listen: 127.0.0.1:1883\n"));
    }

    @Test
    void badFlagsAreNamedInTheMessage() {
        assertEquals("unknown option --sensor",
                assertThrows(IllegalArgumentException.class, () -> LoadMain.Options.parse("--sensor", "3")).getMessage());
        assertEquals("--qos must be 0 or 1, got '2'",
                assertThrows(IllegalArgumentException.class, () -> LoadMain.Options.parse("--qos", "2")).getMessage());
        assertEquals("--zones (5) cannot exceed --sensors (3): every zone needs a sensor",
                assertThrows(IllegalArgumentException.class, () -> LoadMain.Options.parse("--sensors", "3", "--zones", "5")).getMessage());
        assertEquals("--rate needs a number, got 'fast'",
                assertThrows(IllegalArgumentException.class, () -> LoadMain.Options.parse("--rate", "fast")).getMessage());
        assertEquals("--duration needs a value",
                assertThrows(IllegalArgumentException.class, () -> LoadMain.Options.parse("--duration")).getMessage());
        assertEquals(Duration.ofMinutes(2), LoadMain.Options.parse("--duration", "2m").duration());
        assertEquals(Duration.ofSeconds(45), LoadMain.Options.parse("--duration", "45").duration());
    }
}
