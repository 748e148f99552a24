package byre.config;

import static org.junit.jupiter.api.Assertions.assertEquals;

import byre.daemon.ConfigRuleContext;
import byre.daemon.RuleFiles;
import byre.demo.DemoConfig;
import byre.rules.CompileResult;
import byre.rules.RuleCompiler;
import byre.testing.Configs;
import java.nio.file.Path;
import java.util.List;
import org.junit.jupiter.api.Test;

/** The example rule packs that {@code byre demo} runs name only streams the demo's Larkmoor zones can have. */
class DemoRulesTest {
    @Test
    void theDemoRulesCompileWithoutErrorsAgainstTheDemoConfiguration() throws Exception {
        Path rules = Path.of("..", "rules", "examples");
        ByreConfig c = Configs.parse("larkmoor.yaml", DemoConfig.yaml(1883, 9466, rules, Path.of("history.db")), Path.of("."), k -> null);
        CompileResult r = RuleCompiler.compile(RuleFiles.read(List.of(rules)), new ConfigRuleContext(c));
        assertEquals(List.of(), r.errors(), r.render());
    }
}
