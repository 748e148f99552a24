package byre.notify;

import byre.alerts.AlertEvent;
import byre.config.ChannelFields;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.InputStream;
import java.io.OutputStream;
import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;

/**
 * Runs a program (an argv, never through a shell) with the event JSON on standard input and the key fields in
 * the environment (BYRE_EVENT, BYRE_WATCH, BYRE_ZONE, BYRE_LEVEL, BYRE_MESSAGE, BYRE_INCIDENT, BYRE_ID).
 * Exit 0 is success; a non-zero exit or running past the timeout (the program is then killed) is a failure.
 * The program gets a cleared environment: only PATH, the locale variables and byre's fields. byre's own
 * environment can hold secrets (an MQTT password given by {@code password-env}) that a script must not see.
 */
public final class CommandChannel implements Channel {
    private static final int STDERR_KEEP = 4096;
    /** PATH when byre has none (systemd gives services this one). */
    static final String DEFAULT_PATH = "/usr/local/sbin:/usr/local/bin:/usr/sbin:/usr/bin:/sbin:/bin";

    public record Settings(List<String> argv, Duration timeout) {}

    public static final ChannelKind<Settings> KIND = ChannelKind.of("command", List.of("argv", "timeout"), List.of("argv"),
            CommandChannel::read, (name, s, ctx) -> new CommandChannel(name, s.argv(), s.timeout()));

    static Settings read(ChannelFields f) {
        String name = f.channel();
        if (f.has("argv") && !f.isList("argv")) {
            f.problem("argv", name + ".argv must be a list such as [/usr/local/bin/send-sms, \"+440000000000\"] (no shell is used)");
        }
        List<String> argv = f.list("argv");
        if (f.has("argv") && (argv.isEmpty() || argv.get(0).isBlank())) f.problem("argv", name + ".argv is empty");
        return new Settings(List.copyOf(argv), f.duration("timeout", ChannelFactory.DEFAULT_TIMEOUT));
    }

    private final String name;
    private final List<String> argv;
    private final Duration timeout;
    private final Map<String, String> inherited;

    public CommandChannel(String name, List<String> argv, Duration timeout) {
        this(name, argv, timeout, System.getenv());
    }

    /** With the environment byre runs in given, for tests. */
    CommandChannel(String name, List<String> argv, Duration timeout, Map<String, String> byreEnvironment) {
        this.name = name;
        this.argv = List.copyOf(argv);
        this.timeout = timeout;
        this.inherited = passedOn(byreEnvironment);
    }

    /** What a program may see of byre's environment: PATH and the locale (LANG, LANGUAGE, LC_*). */
    static Map<String, String> passedOn(Map<String, String> env) {
        Map<String, String> out = new java.util.TreeMap<>();
        out.put("PATH", env.getOrDefault("PATH", DEFAULT_PATH));
        env.forEach((k, v) -> {
            if (k.equals("LANG") || k.equals("LANGUAGE") || k.startsWith("LC_")) out.put(k, v);
        });
        return Map.copyOf(out);
    }

    @Override
    public String name() {
        return name;
    }

    @Override
    public String type() {
        return "command";
    }

    @Override
    public DeliveryResult deliver(AlertEvent event) {
        ProcessBuilder pb = new ProcessBuilder(argv);
        Map<String, String> env = pb.environment();
        env.clear();
        env.putAll(inherited);
        put(env, "BYRE_EVENT", event.kind().id());
        put(env, "BYRE_WATCH", event.watch());
        put(env, "BYRE_ZONE", event.zone());
        put(env, "BYRE_LEVEL", event.level());
        put(env, "BYRE_MESSAGE", event.message());
        put(env, "BYRE_INCIDENT", event.incident());
        put(env, "BYRE_ID", event.id());
        put(env, "BYRE_SITE", event.site());
        pb.redirectOutput(ProcessBuilder.Redirect.DISCARD);
        Process p;
        try {
            p = pb.start();
        } catch (IOException e) {
            return DeliveryResult.failure(FailureReason.CONFIG, "cannot start " + argv.get(0) + ": " + e.getMessage());
        }
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        Thread drain = new Thread(() -> drain(p.getErrorStream(), err), "command-" + name + "-stderr");
        drain.setDaemon(true);
        drain.start();
        try (OutputStream in = p.getOutputStream()) {
            in.write(event.toJson().getBytes(StandardCharsets.UTF_8));
            in.write('\n');
        } catch (IOException e) {
            // the program may exit without reading its input; its exit code decides
        }
        try {
            if (!p.waitFor(timeout.toMillis(), TimeUnit.MILLISECONDS)) {
                p.descendants().forEach(ProcessHandle::destroyForcibly);
                p.destroyForcibly();
                p.waitFor(2, TimeUnit.SECONDS);
                return DeliveryResult.failure(FailureReason.TIMEOUT, argv.get(0) + " ran longer than " + timeout.toSeconds()
                        + " s and was killed");
            }
            drain.join(1000);
        } catch (InterruptedException e) {
            p.destroyForcibly();
            Thread.currentThread().interrupt();
            return DeliveryResult.failure(FailureReason.IO, "interrupted while waiting for " + argv.get(0));
        }
        int code = p.exitValue();
        if (code == 0) return DeliveryResult.success("exit 0");
        String stderr;
        synchronized (err) {
            stderr = err.toString(StandardCharsets.UTF_8);
        }
        return DeliveryResult.failure(FailureReason.EXIT_CODE, argv.get(0) + " exited with code " + code
                + (stderr.isBlank() ? "" : ": " + DeliveryResult.excerpt(stderr, 300)));
    }

    private static void put(Map<String, String> env, String key, String value) {
        if (value != null) env.put(key, value);
    }

    private static void drain(InputStream in, ByteArrayOutputStream keep) {
        byte[] buf = new byte[1024];
        try (in) {
            int n;
            while ((n = in.read(buf)) > 0) {
                synchronized (keep) {
                    if (keep.size() < STDERR_KEEP) keep.write(buf, 0, Math.min(n, STDERR_KEEP - keep.size()));
                }
            }
        } catch (IOException ignored) {
            // the process ended
        }
    }
}
