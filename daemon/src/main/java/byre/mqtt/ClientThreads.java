package byre.mqtt;

import java.util.concurrent.Future;
import java.util.concurrent.FutureTask;
import java.util.concurrent.ScheduledThreadPoolExecutor;
import java.util.concurrent.TimeUnit;
import java.util.function.BooleanSupplier;
import org.eclipse.paho.client.mqttv3.internal.CommsCallback;
import org.eclipse.paho.client.mqttv3.internal.CommsReceiver;
import org.eclipse.paho.client.mqttv3.internal.CommsSender;

/**
 * The MQTT client's threads, handed to Paho as its executor. Paho 1.2.5 starts its receiving, sending and callback
 * threads one after the other while holding a lock the new thread must take to report that it runs, then checks and
 * naps 100 ms until it does: each connection attempt loses about 300 ms (a third of byre's start-up) to three naps.
 * Here each of those threads is started on a thread of its own, as Paho does without an executor, and as soon as it
 * reports running, the nap of the thread that started it is cut short with an interrupt, which Paho catches and answers
 * by checking again.
 *
 * <p>The interrupt is confined: it is sent only while the starting thread is still between handing over the thread
 * and its next call here (the next start, or the end of the connection attempt, which also runs here), and that call
 * clears any interrupt that arrived after the check had already succeeded on its own. Paho does nothing between those
 * points that an interrupt could disturb (it builds objects and queues the CONNECT packet).
 *
 * <p>Futures of the started threads do not interrupt them when cancelled: as without an executor, Paho's threads end
 * by themselves when their connection closes (a callback interrupted in byre's handler could drop a reading half
 * stored). The one pooled thread runs the keep-alive pings and the checks for running threads.
 */
final class ClientThreads extends ScheduledThreadPoolExecutor {
    /** How often a started thread is checked, and for how long: past the latter Paho's own nap has seen it running. */
    static final long CHECK_NANOS = TimeUnit.MICROSECONDS.toNanos(200);
    static final long GIVE_UP_NANOS = TimeUnit.MILLISECONDS.toNanos(250);

    private final String name;
    /** The thread waiting for a start, and which start (a new object each time); guarded by this. */
    private Thread waiting;
    private Object pending;
    /** Naps cut short (tests read it). */
    private volatile long nudges;

    ClientThreads(String name) {
        super(1, r -> {
            Thread t = new Thread(r, "mqtt-timer " + name);
            t.setDaemon(true);
            return t;
        });
        this.name = name;
        setRemoveOnCancelPolicy(true);
    }

    /** Connection attempts and disconnects: a thread each, as Paho starts them without an executor. */
    @Override
    public void execute(Runnable task) {
        start(() -> {
            try {
                task.run();
            } finally {
                settled();
            }
        });
    }

    /** Paho's receiving, sending and callback loops (each runs until its connection ends). */
    @Override
    public Future<?> submit(Runnable task) {
        settled(); // the previous start, if any, is over: the caller is back here
        FutureTask<Void> future = new FutureTask<>(task, null) {
            @Override
            public boolean cancel(boolean mayInterruptIfRunning) {
                return super.cancel(false);
            }
        };
        BooleanSupplier running = runningCheck(task);
        if (running != null) {
            Object start = new Object();
            synchronized (this) {
                waiting = Thread.currentThread();
                pending = start;
            }
            long deadline = System.nanoTime() + GIVE_UP_NANOS;
            super.schedule(() -> check(start, running, deadline), CHECK_NANOS, TimeUnit.NANOSECONDS);
        }
        start(future);
        return future;
    }

    private void check(Object start, BooleanSupplier running, long deadline) {
        boolean up = running.getAsBoolean();
        if (!up && System.nanoTime() < deadline && !isShutdown()) {
            super.schedule(() -> check(start, running, deadline), CHECK_NANOS, TimeUnit.NANOSECONDS);
            return;
        }
        synchronized (this) {
            if (pending != start) return; // the starter has moved on by itself
            if (up) {
                waiting.interrupt();
                nudges++;
            }
            waiting = null;
            pending = null;
        }
    }

    /** Called by the starting thread when it is back in this class: no interrupt may reach it after this. */
    private void settled() {
        synchronized (this) {
            if (waiting == Thread.currentThread()) {
                waiting = null;
                pending = null;
            }
        }
        Thread.interrupted(); // one that arrived after Paho's own check had already succeeded
    }

    private void start(Runnable r) {
        Thread t = new Thread(r, "mqtt " + name);
        t.setDaemon(true);
        t.start();
    }

    private static BooleanSupplier runningCheck(Runnable task) {
        if (task instanceof CommsReceiver r) return r::isRunning;
        if (task instanceof CommsSender s) return s::isRunning;
        if (task instanceof CommsCallback c) return c::isRunning;
        return null;
    }

    /** Naps cut short since this executor was made. */
    long nudges() {
        return nudges;
    }
}
