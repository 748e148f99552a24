package byre.config;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;

import byre.daemon.ConfigRuleContext;
import byre.daemon.RuleFiles;
import byre.rules.CompileResult;
import byre.rules.RuleCompiler;
import byre.testing.Configs;
import java.nio.file.Files;
import java.nio.file.Path;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The shipped example (also /etc/byre/byre.yaml of the package) loads, and its rule folder compiles cleanly. It points
 * at the barn's mosquitto with byre's login, whose password file the package makes next to it; here the test puts one
 * beside a copy.
 */
class ExampleConfigTest {
    @TempDir
    Path dir;

    @Test
    void theExampleConfigurationAndItsRulesAreValid() throws Exception {
        Path copy = Files.copy(Path.of("..", "config", "byre.example.yaml"), dir.resolve("byre.yaml"));
        Files.writeString(dir.resolve("mqtt.secret"), "made-by-the-package\n");
        Files.createSymbolicLink(dir.resolve("rules.d"), Path.of("..", "config", "rules.d").toAbsolutePath());
        ByreConfig c = Configs.load(copy);
        assertEquals("larkmoor", c.site());
        assertFalse(c.mqtt().embedded(), "the barn's mosquitto, not byre's own broker");
        assertEquals("tcp://127.0.0.1:1883", c.mqtt().connectUri());
        assertEquals("byre", c.mqtt().username());
        assertFalse(c.mqtt().acceptAcks(), "acknowledging over MQTT is off as shipped");
        assertNull(c.mqtt().openAckWarning());
        CompileResult r = RuleCompiler.compile(RuleFiles.read(c.rulePaths()), new ConfigRuleContext(c));
        assertEquals("", r.render(), "the example rules compile without warnings against the example configuration");
        assertFalse(r.ruleSet().orElseThrow().watches().isEmpty());
    }
}
