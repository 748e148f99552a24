package byre.demo;

import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.regex.Matcher;

/**
 * The demo's byre configuration ({@code byre/demo/larkmoor.yaml} on the class path), matching what
 * {@link LarkmoorFarm} publishes, with the parts that differ per run filled in.
 */
public final class DemoConfig {
    public static final String RESOURCE = "/byre/demo/larkmoor.yaml";

    private DemoConfig() {}

    /** The configuration exactly as shipped. */
    public static String text() {
        try (InputStream in = DemoConfig.class.getResourceAsStream(RESOURCE)) {
            if (in == null) throw new IllegalStateException("demo configuration " + RESOURCE + " is missing from the jar");
            return new String(in.readAllBytes(), StandardCharsets.UTF_8);
        } catch (IOException e) {
            throw new UncheckedIOException("cannot read the demo configuration " + RESOURCE, e);
        }
    }

    /**
     * The configuration with the embedded broker on {@code 127.0.0.1:mqttPort}, the admin API on
     * {@code 127.0.0.1:adminPort}, and the given rules folder (or file) and history database.
     */
    public static String yaml(int mqttPort, int adminPort, Path rules, Path history) {
        String t = text();
        t = replaceLine(t, "  listen: 127.0.0.1:1883 ", "  listen: 127.0.0.1:" + mqttPort);
        t = replaceLine(t, "  listen: 127.0.0.1:9466 ", "  listen: 127.0.0.1:" + adminPort);
        t = replaceLine(t, "rules: rules.d ", "rules: " + quoted(rules.toString()));
        t = replaceLine(t, "  path: history.db ", "  path: " + quoted(history.toString()));
        return t;
    }

    /** Replaces the one line starting with {@code start} (comment included). */
    private static String replaceLine(String text, String start, String line) {
        java.util.regex.Pattern p = java.util.regex.Pattern.compile("(?m)^" + java.util.regex.Pattern.quote(start) + ".*$");
        Matcher m = p.matcher(text);
        if (!m.find()) throw new IllegalStateException("demo configuration has no line starting '" + start.trim() + "'");
        return m.replaceFirst(Matcher.quoteReplacement(line));
    }

    /** A YAML double-quoted scalar, safe for any path. */
    static String quoted(String s) {
        return '"' + s.replace("\\", "\\\\").replace("\"", "\\\"") + '"';
    }
}
