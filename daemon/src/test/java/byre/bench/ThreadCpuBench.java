package byre.bench;

import byre.demo.LoadConfig;
import byre.testing.ByreProcess;
import byre.testing.Mosquitto;
import byre.testing.TestPublisher;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.TreeMap;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicLong;

/**
 * Where byre's CPU goes at a light barn load, thread by thread: utime + stime of each thread from
 * /proc/PID/task/TID/stat over a window after a warm-up, summed by thread name (digits folded, so the
 * GC's or Paho's numbered threads are one line). Three processes side by side, each with the unit's JVM options
 * and environment ({@link ByreProcess}): byre at the load, byre with the same configuration and no readings, and an
 * empty JVM that only sleeps (the JVM's own floor). The three run at once (each is light; a process's CPU seconds
 * hardly depend on its neighbours), each with its own mosquitto.
 *
 * <p>Usage (class path as in wear.sh): {@code byre.bench.ThreadCpuBench [--warmup 60] [--seconds 120] [--sensors 40]
 * [--every 10] [--zones 20]}. {@code -Dbyre.bench.jvm="..."} adds JVM options to all three.
 */
public final class ThreadCpuBench {
    /** The empty JVM: sleeps until killed. */
    public static final class Sleeper {
        public static void main(String[] args) throws InterruptedException {
            Thread.sleep(Long.MAX_VALUE);
        }
    }

    public static void main(String[] args) throws Exception {
        int warmupS = 60;
        int seconds = 120;
        int sensors = 40;
        int everyS = 10;
        int zones = 20;
        for (int i = 0; i + 1 < args.length; i += 2) {
            int v = Integer.parseInt(args[i + 1]);
            switch (args[i]) {
                case "--warmup": warmupS = v; break;
                case "--seconds": seconds = v; break;
                case "--sensors": sensors = v; break;
                case "--every": everyS = v; break;
                case "--zones": zones = v; break;
                default: throw new IllegalArgumentException("unknown option " + args[i] + " (--warmup, --seconds, --sensors, --every, --zones)");
            }
        }
        List<String> extra = new ArrayList<>();
        String more = System.getProperty("byre.bench.jvm", "").trim();
        if (!more.isEmpty()) extra.addAll(List.of(more.split("\\s+")));
        Path work = Files.createTempDirectory("byre-threadcpu");
        List<AutoCloseable> open = new ArrayList<>();
        try (Mosquitto loadBroker = Mosquitto.start(); Mosquitto idleBroker = Mosquitto.start();
             HookSink sink = new HookSink()) {
            ByreProcess loaded = launch(work.resolve("loaded"), loadBroker, sink, sensors, zones, extra);
            open.add(loaded);
            ByreProcess idle = launch(work.resolve("idle"), idleBroker, sink, sensors, zones, extra);
            open.add(idle);
            Process empty = emptyJvm(extra);
            open.add(() -> {
                empty.destroy();
                empty.waitFor(5, TimeUnit.SECONDS);
            });
            // The readings carry the time they are sent: the load generator's run on from its first time (a
            // millisecond a round), so after the zones' max-age its readings would no longer count as live.
            long everyNanos = TimeUnit.SECONDS.toNanos(everyS) / sensors;
            int sensorsF = sensors;
            int zonesF = zones;
            AtomicLong sent = new AtomicLong();
            Thread feed = new Thread(() -> {
                try (TestPublisher pub = new TestPublisher(loadBroker.uri())) {
                    long next = System.nanoTime();
                    for (long n = 0; !Thread.currentThread().isInterrupted(); n++) {
                        int i = (int) (n % sensorsF);
                        pub.publish(LoadConfig.topic("load", i, sensorsF, zonesF),
                                LoadConfig.payload(i, n, System.currentTimeMillis(), zonesF), 1, false);
                        sent.incrementAndGet();
                        next += everyNanos;
                        long wait = next - System.nanoTime();
                        if (wait > 0) TimeUnit.NANOSECONDS.sleep(wait);
                    }
                } catch (InterruptedException e) {
                    // the end of the run
                } catch (Exception e) {
                    throw new IllegalStateException(e);
                }
            }, "feed");
            feed.setDaemon(true);
            feed.start();
            Thread.sleep(warmupS * 1000L);
            long[] pids = {loaded.pid(), idle.pid(), empty.pid()};
            List<Map<Integer, Task>> before = new ArrayList<>();
            for (long pid : pids) before.add(tasks(pid));
            long t0 = System.nanoTime();
            Thread.sleep(seconds * 1000L);
            List<Map<Integer, Task>> after = new ArrayList<>();
            for (long pid : pids) after.add(tasks(pid));
            double minutes = (System.nanoTime() - t0) / 60e9;
            feed.interrupt();
            if (!loaded.isAlive() || !idle.isAlive()) throw new IllegalStateException("byre stopped:\n" + loaded.log() + "\n" + idle.log());
            String[] titles = {"byre, " + sensors + " sensors every " + everyS + " s", "byre, no readings", "empty JVM"};
            List<Map<String, Double>> byName = new ArrayList<>();
            for (int p = 0; p < pids.length; p++) byName.add(perName(before.get(p), after.get(p), minutes));
            Map<String, Double> order = new TreeMap<>();
            for (Map<String, Double> m : byName) m.forEach((k, v) -> order.merge(k, v, Double::sum));
            List<String> names = new ArrayList<>(order.keySet());
            names.removeIf(n -> n.endsWith(SYS) || n.endsWith(SLEEPS));
            names.sort(Comparator.comparing((String n) -> -order.get(n)));
            System.out.printf(Locale.ROOT, "%nCPU seconds per minute by thread, over %.1f min after %d s (load: %d readings published)%n",
                    minutes, warmupS, sent.get());
            System.out.println("(each cell: CPU seconds a minute, system time of it, sleeps a minute (voluntary context switches);"
                    + " Linux keeps 15 characters of a thread's name)");
            System.out.printf(Locale.ROOT, "| %-22s | %28s | %26s | %26s |%n", "thread", titles[0], titles[1], titles[2]);
            System.out.println("|---|---|---|---|");
            double[] sums = new double[9];
            for (String n : names) {
                double[] v = new double[9];
                for (int p = 0; p < 3; p++) {
                    v[p] = byName.get(p).getOrDefault(n, 0.0);
                    v[p + 3] = byName.get(p).getOrDefault(n + SYS, 0.0);
                    v[p + 6] = byName.get(p).getOrDefault(n + SLEEPS, 0.0);
                }
                for (int i = 0; i < 9; i++) sums[i] += v[i];
                if (v[0] + v[1] + v[2] < 0.0005 && v[6] + v[7] + v[8] < 1) continue;
                System.out.println(line(n, v));
            }
            System.out.println(line("total", sums));
        } finally {
            for (int i = open.size() - 1; i >= 0; i--) open.get(i).close();
            try (var walk = Files.walk(work)) {
                walk.sorted(Comparator.reverseOrder()).forEach(f -> f.toFile().delete());
            }
        }
        System.exit(0); // the publisher's client threads would keep the JVM alive
    }

    static String line(String name, double[] v) {
        return String.format(Locale.ROOT, "| %-22s | %28s | %26s | %26s |", name, cell(v[0], v[3], v[6]), cell(v[1], v[4], v[7]), cell(v[2], v[5], v[8]));
    }

    static String cell(double total, double sys, double sleeps) {
        return String.format(Locale.ROOT, "%.3f (%.3f) %6.0f/min", total, sys, sleeps);
    }

    static ByreProcess launch(Path dir, Mosquitto broker, HookSink sink, int sensors, int zones, List<String> extra) throws IOException {
        Files.createDirectories(dir);
        Path rules = dir.resolve("rules.d");
        BenchRules.write(rules, zones, false);
        String yaml = LoadConfig.yaml(sensors, zones, broker.uri(), null, "load", rules, dir.resolve("history.db"));
        Path cfg = dir.resolve("byre.yaml");
        Files.writeString(cfg, BenchRules.config(yaml, sink, false) + "\nadmin:\n  listen: 127.0.0.1:" + Mosquitto.freePort() + "\n");
        return ByreProcess.launch(cfg, extra);
    }

    static Process emptyJvm(List<String> extra) throws IOException {
        List<String> cmd = new ArrayList<>();
        cmd.add(Path.of(System.getProperty("java.home"), "bin", "java").toString());
        cmd.addAll(ByreProcess.SERVICE_JVM_OPTIONS);
        cmd.addAll(extra);
        cmd.add("-cp");
        cmd.add(System.getProperty("java.class.path"));
        cmd.add(Sleeper.class.getName());
        ProcessBuilder pb = new ProcessBuilder(cmd).redirectErrorStream(true).redirectOutput(ProcessBuilder.Redirect.DISCARD);
        pb.environment().putAll(ByreProcess.SERVICE_ENVIRONMENT);
        return pb.start();
    }

    static final String SYS = " (sys)";
    static final String SLEEPS = " (sleeps)";

    record Task(String name, long ticks, long sysTicks, long switches) {}

    /** Every thread of a process: its name and utime + stime in clock ticks. */
    static Map<Integer, Task> tasks(long pid) throws IOException {
        Map<Integer, Task> out = new LinkedHashMap<>();
        try (var dirs = Files.list(Path.of("/proc/" + pid + "/task"))) {
            for (Path t : dirs.toList()) {
                try {
                    String stat = Files.readString(t.resolve("stat"));
                    String name = stat.substring(stat.indexOf('(') + 1, stat.lastIndexOf(')'));
                    String[] f = stat.substring(stat.lastIndexOf(')') + 2).split(" ");
                    long switches = 0;
                    for (String line : Files.readAllLines(t.resolve("status"))) {
                        if (line.startsWith("voluntary_ctxt_switches:")) switches = Long.parseLong(line.substring(line.indexOf(':') + 1).trim());
                    }
                    out.put(Integer.parseInt(t.getFileName().toString()),
                            new Task(name, Long.parseLong(f[11]) + Long.parseLong(f[12]), Long.parseLong(f[12]), switches));
                } catch (IOException e) {
                    // the thread ended meanwhile
                }
            }
        }
        return out;
    }

    /**
     * CPU seconds per minute by thread name (digits folded to #), and the system time's share under "name (sys)";
     * threads born in the window count from zero.
     */
    static Map<String, Double> perName(Map<Integer, Task> before, Map<Integer, Task> after, double minutes) {
        Map<String, Double> out = new LinkedHashMap<>();
        after.forEach((tid, t) -> {
            Task b = before.get(tid);
            String name = t.name.replaceAll("[0-9]+", "#");
            out.merge(name, (t.ticks - (b == null ? 0 : b.ticks)) / 100.0 / minutes, Double::sum);
            out.merge(name + SYS, (t.sysTicks - (b == null ? 0 : b.sysTicks)) / 100.0 / minutes, Double::sum);
            out.merge(name + SLEEPS, (t.switches - (b == null ? 0 : b.switches)) / minutes, Double::sum);
        });
        return out;
    }
}
