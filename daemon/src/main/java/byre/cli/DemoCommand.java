package byre.cli;

import byre.config.ByreConfig;
import byre.config.ConfigException;
import byre.config.ConfigLoader;
import byre.config.Durations;
import byre.daemon.Daemon;
import byre.demo.DemoConfig;
import byre.demo.FeedPublisher;
import byre.demo.LarkmoorFarm;
import byre.demo.SimClock;
import byre.mqtt.EmbeddedBroker;
import byre.notify.ChannelTypes;
import byre.zones.ClimateDeriver;
import io.micrometer.core.instrument.simple.SimpleMeterRegistry;
import java.io.IOException;
import java.io.InputStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.List;
import java.util.concurrent.Callable;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

/**
 * {@code byre demo}: the embedded broker, the simulated Larkmoor farm and the daemon in one process,
 * on an accelerated clock, with a scratch folder that is removed at the end. Nothing to set up.
 */
@Command(name = "demo", mixinStandardHelpOptions = true,
        description = {"Embedded broker + simulated Larkmoor farm + daemon, with console lines and alerts.",
                "Nothing to set up; everything it writes goes to a scratch folder that is removed at the end."})
final class DemoCommand implements Callable<Integer> {
    /** Demo rule packs shipped in the jar (copied from rules/examples at build time). */
    static final List<String> RULE_FILES = List.of("calf-cold.rules", "dairy-heat.rules", "sensor-health.rules");

    @Option(names = "--duration", paramLabel = "D", defaultValue = "10m",
            description = "Real time to run, e.g. 60s or 10m (default ${DEFAULT-VALUE}); Ctrl-C stops it sooner.")
    String duration;

    @Option(names = "--speed", paramLabel = "N",
            description = "Simulated seconds per real second (default: the whole simulated day within --duration).")
    Double speed;

    @Option(names = "--seed", defaultValue = "1", description = "Seed of the simulated farm (default ${DEFAULT-VALUE}).")
    long seed;

    @Option(names = "--every", paramLabel = "D", defaultValue = "1h",
            description = "Simulated time between zone lines (default ${DEFAULT-VALUE}).")
    String every;

    @Override
    public Integer call() throws Exception {
        Duration realDuration = Durations.parse(duration).orElse(null);
        Duration lineEvery = Durations.parse(every).orElse(null);
        double speed = realDuration == null ? 0 : this.speed != null ? this.speed : wholeDaySpeed(realDuration);
        if (realDuration == null || lineEvery == null || !(speed > 0) || speed > 100_000) {
            System.err.println("byre demo: --duration and --every take durations like 60s or 10m, --speed a number from 1 to 100000");
            return Main.USAGE;
        }
        long started = System.nanoTime();
        Path scratch = Files.createTempDirectory("byre-demo");
        Daemon daemon = null;
        FeedPublisher feed = null;
        CountDownLatch interrupted = new CountDownLatch(1);
        Thread hook = new Thread(interrupted::countDown, "demo-stop");
        Runtime.getRuntime().addShutdownHook(hook);
        try {
            Path rules = Files.createDirectories(scratch.resolve("rules.d"));
            copyRules(rules);
            int mqttPort = EmbeddedBroker.freePort("127.0.0.1");
            String yaml = DemoConfig.yaml(mqttPort, 0, rules, scratch.resolve("history.db"));
            ByreConfig cfg;
            try {
                cfg = ConfigLoader.parse("demo:larkmoor.yaml", yaml, scratch, System::getenv, ChannelTypes.ALL);
            } catch (ConfigException e) {
                System.err.println("byre demo: the built-in configuration is broken:\n" + e.getMessage());
                return Main.FAILURE;
            }
            // The console shows each alert with its simulated time; the log line would say it twice.
            ((ch.qos.logback.classic.Logger) org.slf4j.LoggerFactory.getLogger("byre.alerts")).setLevel(ch.qos.logback.classic.Level.ERROR);
            LarkmoorFarm farm = new LarkmoorFarm(seed);
            // The simulated clock starts with the feed, not before: while the daemon starts up
            // (a few real seconds, hours of simulated time at high speed) time stands still.
            java.util.concurrent.atomic.AtomicReference<SimClock> running = new java.util.concurrent.atomic.AtomicReference<>();
            java.time.Instant origin = farm.simTime();
            java.time.Clock clock = new java.time.Clock() {
                @Override
                public java.time.ZoneId getZone() {
                    return java.time.ZoneOffset.UTC;
                }

                @Override
                public java.time.Clock withZone(java.time.ZoneId zone) {
                    return this;
                }

                @Override
                public java.time.Instant instant() {
                    SimClock c = running.get();
                    return c == null ? origin : c.instant();
                }
            };
            System.out.printf("byre demo: Larkmoor farm, simulated from %s at %.0fx; stopping after %s (Ctrl-C stops sooner).%n",
                    farm.simTime().atZone(cfg.timezone()).toLocalDateTime(), speed, Durations.format(realDuration));
            daemon = Daemon.create(cfg, clock, new SimpleMeterRegistry())
                    .listen(new ZoneLines(cfg, System.out, lineEvery))
                    .alertsTo(System.out::println)
                    .start(new ClimateDeriver());
            feed = FeedPublisher.toBroker(cfg.mqtt().connectUri(), 1, speed);
            SimClock simClock = new SimClock(origin, speed);
            running.set(simClock);
            feed.start(farm, null, simClock);

            Daemon d = daemon;
            long firstStored = -1;
            long deadline = started + realDuration.toNanos();
            while (System.nanoTime() < deadline) {
                if (interrupted.await(200, TimeUnit.MILLISECONDS)) break;
                if (firstStored < 0 && d.history().stats().rowsWritten() > 0) {
                    firstStored = System.nanoTime();
                }
                if (feed.failure().isPresent()) {
                    System.err.println("byre demo: the simulated farm stopped publishing: " + feed.failure().get());
                    break;
                }
            }
            feed.stop();
            d.flush();
            long rows = d.history().stats().rowsWritten();
            System.out.printf("byre demo: stopped. %d rows stored (%d readings from %d sensors); first row stored %.2f s after start.%n",
                    rows, d.processed(), cfg.sensors().size(), firstStored < 0 ? Double.NaN : (firstStored - started) / 1e9);
            return Main.OK;
        } finally {
            if (feed != null) feed.stop();
            if (daemon != null) daemon.close();
            deleteTree(scratch);
            try {
                Runtime.getRuntime().removeShutdownHook(hook);
            } catch (IllegalStateException shuttingDown) {
                // Ctrl-C: the JVM is already stopping, which is what we want
            }
        }
    }

    /** Simulated time the demo covers by default: one Larkmoor day, from noon to noon. */
    static final Duration SIMULATED_DAY = Duration.ofHours(24);
    /** Real time the start-up takes before the simulated clock runs (the broker, the daemon, the first connection). */
    static final Duration START_UP = Duration.ofSeconds(3);

    /**
     * The speed that fits the whole simulated day into {@code realDuration} after start-up, so that even
     * {@code --duration 60s} shows the afternoon heat, the silent sensor and the cold night with their alerts.
     */
    static double wholeDaySpeed(Duration realDuration) {
        long ms = Math.max(1000, realDuration.minus(START_UP).toMillis());
        return Math.min(MAX_DEFAULT_SPEED, Math.ceil(SIMULATED_DAY.toMillis() / (double) ms));
    }

    /**
     * The fastest default: each simulated sensor reports once a simulated minute, so this speed keeps its readings
     * at 60 % of the daemon's flood limit per sensor (which would drop the rest): 1800x, 30 readings a real second.
     * A shorter --duration then shows part of the day.
     */
    static final double MAX_DEFAULT_SPEED = Daemon.FLOOD_LIMIT_PER_SENSOR * 0.6 * 60;

    private static void copyRules(Path dir) throws IOException {
        for (String name : RULE_FILES) {
            try (InputStream in = DemoCommand.class.getResourceAsStream("/byre/demo/rules/" + name)) {
                if (in != null) Files.copy(in, dir.resolve(name));
            }
        }
    }

    static void deleteTree(Path dir) {
        try (var walk = Files.walk(dir)) {
            walk.sorted(java.util.Comparator.reverseOrder()).forEach(p -> p.toFile().delete());
        } catch (IOException ignored) {
            // a scratch folder in /tmp; the OS cleans it eventually
        }
    }

}
