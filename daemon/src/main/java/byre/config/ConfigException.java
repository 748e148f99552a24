package byre.config;

import java.util.List;
import java.util.stream.Collectors;

/** A configuration that cannot be used; carries every problem found, not just the first. */
public final class ConfigException extends Exception {
    private final List<ConfigProblem> problems;

    public ConfigException(List<ConfigProblem> problems) {
        super(problems.stream().map(ConfigProblem::toString).collect(Collectors.joining("\n")));
        this.problems = List.copyOf(problems);
    }

    public List<ConfigProblem> problems() {
        return problems;
    }
}
