package byre.rules;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.Random;
import org.junit.jupiter.api.Test;

/** Bad files give diagnostics, never an exception. */
class MalformedCorpusTest {
    static CompileResult compile(RuleSource src) {
        return RuleCompiler.compile(List.of(src), Scenario.farm());
    }

    static List<RuleSource> corpus() {
        List<RuleSource> c = new ArrayList<>();
        String full = GrammarTest.DESIGN_EXAMPLES;
        for (int cut = 1; cut < full.length(); cut += 7) c.add(new RuleSource("truncated-" + cut + ".rules", full.substring(0, cut)));
        c.add(new RuleSource("deep-parens.rules", "watch w\n raise when " + "(".repeat(10_000) + "cows.thi > 1" + ")".repeat(10_000) + "\n"));
        c.add(new RuleSource("deep-not.rules", "watch w\n raise when " + "not ".repeat(10_000) + "cows.thi > 1\n"));
        c.add(new RuleSource("long-and.rules", "watch w\n notify office\n raise when cows.thi > 1" + " and cows.thi > 1".repeat(20_000) + "\n clear when cows.thi < 0\n"));
        c.add(new RuleSource("unclosed.rules", "watch w\n raise when " + "(".repeat(10_000) + "\n"));
        c.add(new RuleSource("megaline.rules", "watch w\n raise when cows.thi > " + "9".repeat(1 << 20) + "\n"));
        c.add(new RuleSource("megaword.rules", "x".repeat(1 << 20)));
        c.add(new RuleSource("megastring.rules", "watch w\n raise when silent(cows.thi)\n message \"" + "y".repeat(1 << 20)));
        c.add(new RuleSource("keywords.rules", "when when when\nfor\nand or not\nwatch\nwatch and\n)))\n,,,\n@@@\n...\n"));
        c.add(new RuleSource("empty.rules", ""));
        c.add(new RuleSource("nul.rules", "\0\0\0watch\0"));
        c.add(new RuleSource("crlf.rules", full.replace("\n", "\r\n")));
        c.add(new RuleSource("numbers.rules", "watch w\n raise when cows.thi > 1e309 or cows.thi > 99999999999999999999999999d or cows.thi > 1.2.3\n"));
        Random rnd = new Random(42);
        for (int k = 0; k < 50; k++) {
            byte[] b = new byte[rnd.nextInt(2000)];
            rnd.nextBytes(b);
            c.add(RuleSource.ofBytes("binary-" + k + ".rules", b));
        }
        String[] soup = {"watch", "raise", "clear", "when", "for", "(", ")", "not", "and", "or", "@calves", ".", "cows", "thi", "*",
                ">", "<=", "==", "5", "C", "30m", "avg", "hours-above", "silent", "stuck", ",", "\n", "\"", "only", "between", "18:00",
                "message", "{", "}", "notify", "office", "-", "1h30m", "%", "rise"};
        for (int k = 0; k < 300; k++) {
            StringBuilder sb = new StringBuilder();
            int n = rnd.nextInt(200);
            for (int i = 0; i < n; i++) sb.append(soup[rnd.nextInt(soup.length)]).append(rnd.nextInt(4) == 0 ? "" : " ");
            c.add(new RuleSource("soup-" + k + ".rules", sb.toString()));
        }
        return c;
    }

    @Test
    void neverThrowsAndEveryRenderWorks() {
        for (RuleSource src : corpus()) {
            CompileResult r = compile(src);
            for (Diagnostic d : r.diagnostics()) {
                assertTrue(d.line() >= 1 && d.column() >= 1, src.name() + ": " + d);
                String shown = d.render();
                assertTrue(shown.length() < 2_000, src.name() + ": rendered diagnostic too long");
                assertFalse(d.message().startsWith("internal error"), src.name() + ": " + d);
            }
            assertTrue(r.diagnostics().size() <= 101, src.name());
        }
    }

    @Test
    void specificMessagesForTheHardCases() {
        assertEquals("deep.rules:2:46: condition nested more than 32 levels deep",
                compile(new RuleSource("deep.rules", "watch w\n raise when " + "(".repeat(10_000) + "cows.thi > 1" + ")".repeat(10_000) + "\n"))
                        .errors().get(0).headline());
        CompileResult bin = compile(RuleSource.ofBytes("bin.rules", new byte[] {(byte) 0xff, (byte) 0xfe, 0x01, '\n', 0x02}));
        assertEquals(List.of("bin.rules:1:1: bytes that are not UTF-8 text (is this a rule file?)",
                        "bin.rules:2:1: unexpected control character U+0002 (is this a rule file?)"),
                bin.diagnostics().stream().map(Diagnostic::headline).toList());
        CompileResult mega = compile(new RuleSource("mega.rules", "watch w\n notify office\n raise when cows.thi > 72 " + "x".repeat(1 << 20) + "\n"));
        Diagnostic d = mega.diagnostics().get(0);
        assertEquals("mega.rules:3:27: unknown unit '" + "x".repeat(40) + "...'", d.headline());
        assertTrue(d.render().split("\n")[1].length() < 200, "the excerpt of a 1 MB line is short");
        String many = "watch w\n" + "bogus\n".repeat(500);
        CompileResult capped = compile(new RuleSource("many.rules", many));
        assertEquals(101, capped.diagnostics().size());
        assertEquals("too many problems; stopping after 100 in this file", capped.diagnostics().get(100).message());
        assertTrue(compile(new RuleSource("e.rules", new String(new byte[0], StandardCharsets.UTF_8))).diagnostics().isEmpty());
    }
}
