package byre.rules;

import java.util.List;
import java.util.Optional;
import java.util.stream.Collectors;

/** Diagnostics of all files (errors and warnings, in file order) and, when there is no error, the rule set. */
public record CompileResult(List<Diagnostic> diagnostics, Optional<RuleSet> ruleSet) {
    public boolean hasErrors() { return diagnostics.stream().anyMatch(Diagnostic::isError); }

    public List<Diagnostic> errors() { return diagnostics.stream().filter(Diagnostic::isError).toList(); }

    public List<Diagnostic> warnings() { return diagnostics.stream().filter(d -> !d.isError()).toList(); }

    /** Every diagnostic rendered with its source and caret lines, separated by blank lines. */
    public String render() {
        return diagnostics.stream().map(Diagnostic::render).collect(Collectors.joining("\n\n"));
    }
}
