package byre.config;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.daemon.ConfigRuleContext;
import byre.daemon.RuleFiles;
import byre.rules.CompileResult;
import byre.rules.RuleCompiler;
import java.nio.file.Path;
import org.junit.jupiter.api.Test;

/** The shipped example (also /etc/byre/byre.yaml of the package) loads, and its rule folder compiles cleanly. */
class ExampleConfigTest {
    @Test
    void theExampleConfigurationAndItsRulesAreValid() throws Exception {
        ByreConfig c = ConfigLoader.load(Path.of("..", "config", "byre.example.yaml"));
        assertEquals("larkmoor", c.site());
        assertTrue(c.mqtt().embedded(), "runs as shipped, with byre's own broker");
        CompileResult r = RuleCompiler.compile(RuleFiles.read(c.rulePaths()), new ConfigRuleContext(c));
        assertEquals("", r.render(), "the example rules compile without warnings against the example configuration");
        assertFalse(r.ruleSet().orElseThrow().watches().isEmpty());
    }
}
