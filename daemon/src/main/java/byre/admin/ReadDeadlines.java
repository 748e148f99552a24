package byre.admin;

import java.time.Duration;
import java.util.concurrent.Executor;
import java.util.concurrent.ScheduledExecutorService;
import java.util.concurrent.ScheduledThreadPoolExecutor;
import java.util.concurrent.TimeUnit;

/**
 * The admin server's executor: runs each exchange (which reads the request line, the headers and then, in the
 * handler, the body) on a worker and interrupts the worker when the request has not been read whole within the
 * timeout. The JDK server reads from a blocking socket channel, which an interrupt closes, so the stalled read ends
 * at once and the worker is free again. Once the handler has the whole request ({@link #requestRead()}) nothing is
 * interrupted any more: a slow answer (a large scrape) is never cut.
 */
final class ReadDeadlines implements Executor, AutoCloseable {
    private static final ThreadLocal<Deadline> CURRENT = new ThreadLocal<>();

    private final Executor workers;
    private final long timeoutNanos;
    private final ScheduledExecutorService timer;

    ReadDeadlines(Executor workers, Duration timeout) {
        this.workers = workers;
        this.timeoutNanos = timeout.toNanos();
        ScheduledThreadPoolExecutor t = new ScheduledThreadPoolExecutor(1, r -> {
            Thread th = new Thread(r, "admin-http-deadline");
            th.setDaemon(true);
            return th;
        });
        t.setRemoveOnCancelPolicy(true);
        this.timer = t;
    }

    @Override
    public void execute(Runnable exchange) {
        workers.execute(() -> {
            Deadline d = new Deadline(Thread.currentThread());
            CURRENT.set(d);
            var expiry = timer.schedule(d::expire, timeoutNanos, TimeUnit.NANOSECONDS);
            try {
                exchange.run();
            } finally {
                expiry.cancel(false);
                d.finish();
                CURRENT.remove();
                Thread.interrupted(); // an expiry must not reach the next exchange on this worker
            }
        });
    }

    /**
     * Called by the handler once it holds the whole request: stops the deadline. False when the deadline had already
     * passed (the connection is being closed; the handler should answer nothing).
     */
    static boolean requestRead() {
        Deadline d = CURRENT.get();
        return d == null || d.read();
    }

    @Override
    public void close() {
        timer.shutdownNow();
    }

    /** One exchange's deadline; its three transitions are atomic, so an interrupt never lands after the read ended. */
    private static final class Deadline {
        private final Thread worker;
        private boolean reading = true;
        private boolean expired;

        Deadline(Thread worker) {
            this.worker = worker;
        }

        synchronized void expire() {
            if (!reading) return;
            expired = true;
            reading = false;
            worker.interrupt();
        }

        synchronized boolean read() {
            reading = false;
            return !expired;
        }

        synchronized void finish() {
            reading = false;
        }
    }
}
