package byre.cli;

import byre.config.ByreConfig;
import byre.daemon.Daemon;
import byre.zones.ClimateDeriver;
import io.micrometer.prometheusmetrics.PrometheusConfig;
import io.micrometer.prometheusmetrics.PrometheusMeterRegistry;
import java.time.Clock;
import java.util.concurrent.Callable;
import java.util.concurrent.CountDownLatch;
import picocli.CommandLine.Command;
import picocli.CommandLine.Mixin;

/** {@code byre run}: the daemon, until SIGTERM or Ctrl-C. */
@Command(name = "run", mixinStandardHelpOptions = true, description = "Run the daemon (until stopped by SIGTERM or Ctrl-C).")
final class RunCommand implements Callable<Integer> {
    @Mixin
    ConfigOption config;

    @Override
    public Integer call() throws Exception {
        ByreConfig cfg = config.load(System.err);
        if (cfg == null) return Main.USAGE;
        PrometheusMeterRegistry registry = new PrometheusMeterRegistry(PrometheusConfig.DEFAULT);
        Daemon daemon;
        try {
            daemon = Daemon.create(cfg, Clock.systemUTC(), registry).start(new ClimateDeriver());
        } catch (Daemon.StartException e) {
            System.err.println("byre: cannot start: " + e.getMessage());
            return Main.USAGE;
        } catch (Exception e) {
            System.err.println("byre: cannot start: " + e.getMessage());
            return Main.FAILURE;
        }
        CountDownLatch stopped = new CountDownLatch(1);
        Thread hook = new Thread(() -> {
            daemon.close();
            stopped.countDown();
        }, "shutdown");
        Runtime.getRuntime().addShutdownHook(hook);
        stopped.await();
        return Main.OK;
    }
}
