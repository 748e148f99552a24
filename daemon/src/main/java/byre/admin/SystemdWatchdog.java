package byre.admin;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Map;
import java.util.concurrent.Executors;
import java.util.concurrent.ScheduledExecutorService;
import java.util.concurrent.TimeUnit;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Pets the systemd watchdog ({@code WatchdogSec=} in the unit) while {@link HealthMonitor} says healthy, so a hung
 * or wedged daemon (broker gone for good, connected but hearing nothing, database not writable, pipeline stuck) is
 * restarted by systemd.
 *
 * <p>Why through the {@code systemd-notify} program: the notification socket is a Unix datagram socket, and Java 17
 * speaks Unix sockets only as streams. {@code systemd-notify} runs as a child, so the unit needs
 * {@code NotifyAccess=all}. systemd finds the sender's unit from its process id; a sender that has already exited
 * and been reaped cannot be placed, and its message is dropped. To keep the sender findable it is started as
 * {@code sh -c 'systemd-notify WATCHDOG=1 & exec sleep 2'}: after the exec nothing waits for it, so it stays a
 * zombie (still in the service's cgroup) for two seconds. The ping runs four times per watchdog period, so one
 * lost message does no harm. Without {@code $NOTIFY_SOCKET} and {@code $WATCHDOG_USEC} this does nothing.
 */
public final class SystemdWatchdog implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(SystemdWatchdog.class);

    private final ScheduledExecutorService timer;

    private SystemdWatchdog(ScheduledExecutorService timer) {
        this.timer = timer;
    }

    /** Starts pinging when run under a systemd watchdog; otherwise returns an idle instance. */
    public static SystemdWatchdog startIfRequested(Map<String, String> env, HealthMonitor health) {
        long usec = parse(env.get("WATCHDOG_USEC"));
        if (env.get("NOTIFY_SOCKET") == null || usec <= 0) return new SystemdWatchdog(null);
        String pid = env.get("WATCHDOG_PID");
        if (pid != null && !pid.equals(Long.toString(ProcessHandle.current().pid()))) return new SystemdWatchdog(null);
        if (!Files.isExecutable(Path.of("/bin/systemd-notify")) && !Files.isExecutable(Path.of("/usr/bin/systemd-notify"))) {
            LOG.warn("systemd asks for watchdog pings but systemd-notify is missing; the service will be restarted by the watchdog");
            return new SystemdWatchdog(null);
        }
        ScheduledExecutorService t = Executors.newSingleThreadScheduledExecutor(r -> {
            Thread th = new Thread(r, "watchdog");
            th.setDaemon(true);
            return th;
        });
        long periodMs = Math.max(1000, usec / 1000 / 4);
        boolean[] wasHealthy = {true};
        t.scheduleAtFixedRate(() -> {
            try {
                Health h = health.check();
                if (h.healthy()) {
                    ping();
                    if (!wasHealthy[0]) LOG.info("healthy again; watchdog pings resumed");
                } else if (wasHealthy[0]) {
                    LOG.warn("unhealthy, watchdog pings stopped (systemd restarts byre unless it recovers): {}", String.join("; ", h.problems()));
                }
                wasHealthy[0] = h.healthy();
            } catch (RuntimeException e) {
                LOG.warn("watchdog check failed: {}", e.toString());
            }
        }, 0, periodMs, TimeUnit.MILLISECONDS);
        LOG.info("systemd watchdog: ping every {} ms while healthy", periodMs);
        return new SystemdWatchdog(t);
    }

    private static void ping() {
        try {
            new ProcessBuilder("/bin/sh", "-c", "systemd-notify WATCHDOG=1 & exec sleep 2")
                    .redirectErrorStream(true).redirectOutput(ProcessBuilder.Redirect.DISCARD).start();
        } catch (java.io.IOException e) {
            LOG.warn("cannot run systemd-notify: {}", e.getMessage());
        }
    }

    private static long parse(String s) {
        try {
            return s == null ? 0 : Long.parseLong(s.strip());
        } catch (NumberFormatException e) {
            return 0;
        }
    }

    public boolean active() {
        return timer != null;
    }

    @Override
    public void close() {
        if (timer != null) timer.shutdownNow();
    }
}
