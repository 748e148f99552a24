package byre.rules;

import byre.rules.lang.Ast;
import byre.rules.lang.DiagnosticSink;
import byre.rules.lang.Parser;
import byre.rules.lang.Pos;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;

/** Parses and checks rule files. Never throws on bad input: every problem becomes a diagnostic. */
public final class RuleCompiler {
    private RuleCompiler() {}

    public static CompileResult compile(List<RuleSource> files, RuleContext ctx) {
        List<Diagnostic> all = new ArrayList<>();
        List<Watch> watches = new ArrayList<>();
        Map<String, Ast.Watch> seen = new HashMap<>();
        for (RuleSource f : files) {
            DiagnosticSink sink = new DiagnosticSink(f.name(), f.text());
            try {
                for (Ast.Watch w : Parser.parse(f.text(), sink)) {
                    Ast.Watch first = seen.putIfAbsent(w.name(), w);
                    if (first != null) {
                        sink.error(w.pos(), "watch '" + w.name() + "' is already defined at " + first.file() + ":" + first.pos().line());
                        continue;
                    }
                    new Checker(ctx, sink).check(w).ifPresent(watches::add);
                }
            } catch (RuntimeException | StackOverflowError e) {
                // A bug of ours must not take the daemon down with a bad file; say so plainly.
                sink.error(new Pos(1, 1, 1), "internal error while checking this file (" + e + "); please report it");
            }
            List<Diagnostic> mine = new ArrayList<>(sink.diagnostics());
            mine.sort(java.util.Comparator.comparingInt(Diagnostic::line)); // stable: same-line order is kept
            all.addAll(mine);
        }
        boolean errors = all.stream().anyMatch(Diagnostic::isError);
        Optional<RuleSet> set = errors ? Optional.empty()
                : Optional.of(new RuleSet(watches, ctx.site(), Checker.maxAges(ctx), RuleContext.DEFAULT_MAX_AGE));
        return new CompileResult(List.copyOf(all), set);
    }
}
