package byre.testing;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * byre as its own JVM ({@code byre.cli.Main run --config F}) on this JVM's class path, with the JVM options
 * of the systemd unit, so that it can be killed with SIGKILL like a real crash or measured from outside
 * (/proc/PID/status). Output goes to a log file next to the configuration.
 */
public final class ByreProcess implements AutoCloseable {
    /**
     * The JVM options the packaged service runs with, read from the unit file ({@code BYRE_JAVA_OPTS}), so that
     * tests and benchmarks run byre as it runs in a barn (C1 only, a 64 MB serial-GC heap, ...).
     */
    public static final List<String> SERVICE_JVM_OPTIONS = serviceJvmOptions();

    static List<String> serviceJvmOptions() {
        Pattern opts = Pattern.compile("(?m)^Environment=\"BYRE_JAVA_OPTS=([^\"]*)\"");
        for (Path unit : List.of(Path.of("systemd", "byre.service"), Path.of("..", "systemd", "byre.service"))) {
            if (!Files.isRegularFile(unit)) continue;
            try {
                Matcher m = opts.matcher(Files.readString(unit));
                if (m.find()) return List.of(m.group(1).trim().split("\\s+"));
            } catch (IOException e) {
                throw new UncheckedIOException(e);
            }
            throw new IllegalStateException(unit + " sets no BYRE_JAVA_OPTS");
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
        Process p = new ProcessBuilder(cmd).redirectErrorStream(true).redirectOutput(log.toFile()).start();
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
