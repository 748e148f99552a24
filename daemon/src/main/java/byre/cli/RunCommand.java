package byre.cli;

import byre.admin.AdminServer;
import byre.admin.HealthMonitor;
import byre.admin.LiveValues;
import byre.admin.SystemdWatchdog;
import byre.config.ByreConfig;
import byre.daemon.Daemon;
import byre.zones.ClimateDeriver;
import io.micrometer.core.instrument.binder.jvm.ClassLoaderMetrics;
import io.micrometer.core.instrument.binder.jvm.JvmGcMetrics;
import io.micrometer.core.instrument.binder.jvm.JvmMemoryMetrics;
import io.micrometer.core.instrument.binder.jvm.JvmThreadMetrics;
import io.micrometer.core.instrument.binder.system.FileDescriptorMetrics;
import io.micrometer.core.instrument.binder.system.ProcessorMetrics;
import io.micrometer.core.instrument.binder.system.UptimeMetrics;
import io.micrometer.prometheusmetrics.PrometheusConfig;
import io.micrometer.prometheusmetrics.PrometheusMeterRegistry;
import java.time.Clock;
import java.util.concurrent.Callable;
import java.util.concurrent.CountDownLatch;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;
import picocli.CommandLine.Command;
import picocli.CommandLine.Mixin;

/** {@code byre run}: the daemon, until SIGTERM or Ctrl-C; SIGHUP asks for a reload. */
@Command(name = "run", mixinStandardHelpOptions = true, description = "Run the daemon (until stopped by SIGTERM or Ctrl-C; SIGHUP reloads).")
final class RunCommand implements Callable<Integer> {
    private static final Logger LOG = LoggerFactory.getLogger(RunCommand.class);

    @Mixin
    ConfigOption config;

    @Override
    public Integer call() throws Exception {
        ByreConfig cfg = config.load(System.err);
        if (cfg == null) return Main.USAGE;
        PrometheusMeterRegistry registry = new PrometheusMeterRegistry(PrometheusConfig.DEFAULT);
        bindJvmMetrics(registry);
        LiveValues live = new LiveValues();
        Daemon daemon;
        try {
            daemon = Daemon.create(cfg, Clock.systemUTC(), registry).listen(live).start(new ClimateDeriver());
        } catch (Daemon.StartException e) {
            System.err.println("byre: cannot start: " + e.getMessage());
            return Main.USAGE;
        } catch (Exception e) {
            System.err.println("byre: cannot start: " + e.getMessage());
            return Main.FAILURE;
        }
        HealthMonitor health = new HealthMonitor(daemon::health);
        AdminServer admin = null;
        if (cfg.admin().tokenProblem() != null) {
            LOG.warn("{}: acknowledging through the admin API is off until the token file exists", cfg.admin().tokenProblem());
        }
        if (cfg.admin().enabled()) {
            try {
                admin = AdminServer.start(cfg.admin().host(), cfg.admin().port(), cfg.admin().token(), registry::scrape, health, live,
                        Clock.systemUTC(), cfg.site());
                Daemon running = daemon;
                admin.setAlertSource(running::openAlerts);
                admin.setHistoryWrite(running::flush);
                admin.setAckHandler((incident, by) -> {
                    byre.alerts.AckResult r = running.acknowledge(incident, by);
                    switch (r.status()) {
                        case ACKNOWLEDGED: return byre.admin.AckHandler.Result.acknowledged(r.detail());
                        case ALREADY: return new byre.admin.AckHandler.Result(byre.admin.AckHandler.Outcome.ALREADY_ACKNOWLEDGED, r.detail());
                        case UNKNOWN: return byre.admin.AckHandler.Result.unknown(r.detail());
                        default: return new byre.admin.AckHandler.Result(byre.admin.AckHandler.Outcome.FAILED, r.detail());
                    }
                });
            } catch (java.io.IOException e) {
                System.err.println("byre: cannot open the admin API on " + cfg.admin().host() + ":" + cfg.admin().port() + ": " + e.getMessage());
                daemon.close();
                return Main.FAILURE;
            }
        }
        byre.page.BarnPage page = null;
        try {
            page = byre.page.BarnPage.start(cfg, daemon, live, registry, Clock.systemUTC()).orElse(null);
        } catch (java.io.IOException e) {
            System.err.println("byre: cannot open the barn page on " + cfg.page().host() + ":" + cfg.page().port() + ": " + e.getMessage());
            if (admin != null) admin.close();
            daemon.close();
            return Main.FAILURE;
        }
        SystemdWatchdog watchdog = SystemdWatchdog.startIfRequested(System.getenv(), health);
        onSighup(reloadAction(daemon));

        CountDownLatch stopped = new CountDownLatch(1);
        AdminServer adminToClose = admin;
        byre.page.BarnPage pageToClose = page;
        Thread hook = new Thread(() -> {
            watchdog.close();
            if (pageToClose != null) pageToClose.close();
            if (adminToClose != null) adminToClose.close();
            daemon.close();
            stopped.countDown();
        }, "shutdown");
        Runtime.getRuntime().addShutdownHook(hook);
        stopped.await();
        return Main.OK;
    }

    /** JVM and process meters for /metrics: memory, GC, threads, classes, CPU, uptime, open files. */
    static void bindJvmMetrics(PrometheusMeterRegistry registry) {
        new ClassLoaderMetrics().bindTo(registry);
        new JvmMemoryMetrics().bindTo(registry);
        new JvmGcMetrics().bindTo(registry);
        new JvmThreadMetrics().bindTo(registry);
        new ProcessorMetrics().bindTo(registry);
        new UptimeMetrics().bindTo(registry);
        new FileDescriptorMetrics().bindTo(registry);
    }

    // ---- reload hook: SIGHUP (systemctl reload byre) runs this; rules and configuration reload plug in here ----

    /**
     * What SIGHUP ({@code systemctl reload byre}) does: the rule files are read again (a file with an
     * error keeps the old rules running), and the configuration is checked; changes to it other than
     * the rule files take effect at the next restart, and the log says so.
     */
    static Runnable reloadAction(Daemon daemon) {
        return () -> {
            java.nio.file.Path file = daemon.config().file();
            LOG.info("reload requested (SIGHUP): rules from {}", daemon.config().rulePaths());
            try {
                byre.config.ByreConfig fresh = byre.config.ConfigLoader.load(file, byre.notify.ChannelTypes.ALL);
                if (!fresh.equals(daemon.config().withRulePaths(fresh.rulePaths()))) {
                    LOG.warn("{} has changed beyond the rule files: restart byre (systemctl restart byre) to apply it", file);
                }
            } catch (byre.config.ConfigException e) {
                LOG.error("{} has problems; the running configuration stays in force:\n{}", file, e.getMessage());
            }
            daemon.reload();
        };
    }

    /** Runs {@code action} on every SIGHUP, on its own thread so a slow reload never blocks signal handling. */
    static void onSighup(Runnable action) {
        try {
            sun.misc.Signal.handle(new sun.misc.Signal("HUP"), sig -> {
                Thread t = new Thread(() -> {
                    try {
                        action.run();
                    } catch (RuntimeException e) {
                        LOG.error("reload failed; the running rules and configuration stay in force: {}", e.toString(), e);
                    }
                }, "reload");
                t.start();
            });
        } catch (IllegalArgumentException e) {
            LOG.warn("SIGHUP cannot be handled on this platform; reload needs a restart");
        }
    }
}
