package byre.testing;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * byre as its own JVM ({@code byre.cli.Main run --config F}) on this JVM's class path, with the JVM options
 * and environment of the systemd unit, so that it can be killed with SIGKILL like a real crash or measured from outside
 * (/proc/PID/status). Output goes to a log file next to the configuration.
 */
public final class ByreProcess implements AutoCloseable {
    /**
     * The JVM options the packaged service runs with, read from the unit file ({@code BYRE_JAVA_OPTS}), so that
     * tests and benchmarks run byre as it runs in a barn (C1 only, a 64 MB serial-GC heap, ...).
     */
    public static final List<String> SERVICE_JVM_OPTIONS = serviceJvmOptions();
    /**
     * The other variables the unit sets ({@code Environment=NAME=value}, e.g. the C library's allocator settings), so that
     * byre's memory is measured as the service's would be.
     */
    public static final Map<String, String> SERVICE_ENVIRONMENT = serviceEnvironment();

    static List<String> serviceJvmOptions() {
        String opts = unitEnvironment().get("BYRE_JAVA_OPTS");
        if (opts == null) throw new IllegalStateException("systemd/byre.service sets no BYRE_JAVA_OPTS");
        return List.of(opts.trim().split("\\s+"));
    }

    static Map<String, String> serviceEnvironment() {
        Map<String, String> env = new LinkedHashMap<>(unitEnvironment());
        env.remove("BYRE_JAVA_OPTS");
        return Map.copyOf(env);
    }

    /** Every {@code Environment=} assignment of the unit file, quoted ({@code "NAME=value"}) or not. */
    static Map<String, String> unitEnvironment() {
        Pattern line = Pattern.compile("(?m)^Environment=(?:\"([^\"]*)\"|(\\S+))\\s*$");
        for (Path unit : List.of(Path.of("systemd", "byre.service"), Path.of("..", "systemd", "byre.service"))) {
            if (!Files.isRegularFile(unit)) continue;
            Map<String, String> out = new LinkedHashMap<>();
            try {
                Matcher m = line.matcher(Files.readString(unit));
                while (m.find()) {
                    String assignment = m.group(1) != null ? m.group(1) : m.group(2);
                    int eq = assignment.indexOf('=');
                    if (eq > 0) out.put(assignment.substring(0, eq), assignment.substring(eq + 1));
                }
            } catch (IOException e) {
                throw new UncheckedIOException(e);
            }
            return out;
        }
        throw new IllegalStateException("systemd/byre.service not found from " + Path.of("").toAbsolutePath());
    }

    private final Process process;
    private final Path log;
    private final long launchedNanos;

    private ByreProcess(Process process, Path log, long launchedNanos) {
        this.process = process;
        this.log = log;
        this.launchedNanos = launchedNanos;
    }

    /** Launches {@code byre run --config config}; returns at once. */
    public static ByreProcess launch(Path config, List<String> extraJvmOptions) throws IOException {
        List<String> cmd = new ArrayList<>();
        cmd.add(Path.of(System.getProperty("java.home"), "bin", "java").toString());
        cmd.addAll(SERVICE_JVM_OPTIONS);
        cmd.addAll(extraJvmOptions);
        cmd.add("-cp");
        cmd.add(System.getProperty("java.class.path"));
        cmd.add("byre.cli.Main");
        cmd.add("run");
        cmd.add("--config");
        cmd.add(config.toString());
        Path log = config.resolveSibling("byre-" + System.nanoTime() + ".log");
        long t0 = System.nanoTime();
        ProcessBuilder pb = new ProcessBuilder(cmd).redirectErrorStream(true).redirectOutput(log.toFile());
        pb.environment().putAll(SERVICE_ENVIRONMENT);
        Process p = pb.start();
        return new ByreProcess(p, log, t0);
    }

    public long pid() {
        return process.pid();
    }

    public boolean isAlive() {
        return process.isAlive();
    }

    /** System.nanoTime() just before the JVM was launched. */
    public long launchedNanos() {
        return launchedNanos;
    }

    /** SIGKILL, as a crash or a power cut of the process would be: no shutdown hook runs. */
    public void kill9() throws InterruptedException {
        process.destroyForcibly();
        process.waitFor(10, TimeUnit.SECONDS);
    }

    /** SIGTERM (what systemd sends), then waits up to {@code seconds} for the exit code. */
    public int stop(int seconds) throws InterruptedException {
        process.destroy();
        if (!process.waitFor(seconds, TimeUnit.SECONDS)) {
            kill9();
            return -1;
        }
        return process.exitValue();
    }

    /** A field of /proc/PID/status in kB (VmRSS, VmHWM), or -1. */
    public long procStatusKb(String field) {
        try {
            for (String line : Files.readAllLines(Path.of("/proc/" + pid() + "/status"))) {
                if (line.startsWith(field + ":")) return Long.parseLong(line.replaceAll("[^0-9]", ""));
            }
        } catch (IOException | NumberFormatException e) {
            return -1;
        }
        return -1;
    }

    public String log() {
        try {
            return Files.readString(log);
        } catch (IOException e) {
            return "(no log: " + e.getMessage() + ")";
        }
    }

    @Override
    public void close() throws InterruptedException {
        if (process.isAlive()) stop(15);
    }
}
