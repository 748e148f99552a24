package byre.bench;

import byre.demo.LoadConfig;
import byre.demo.LoadMain;
import byre.history.HistoryStore;
import byre.history.HistoryWriter;
import byre.history.Retention;
import byre.history.StreamKey;
import byre.testing.ByreProcess;
import byre.testing.Mosquitto;
import java.io.IOException;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneId;
import java.time.ZoneOffset;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Locale;
import java.util.concurrent.TimeUnit;

/**
 * Storage wear at barn rates: byre beside two minimal writers, fed the same QoS 1 messages, each writing to its own
 * freshly made ext4 filesystem on a loop device, so that the bytes counted are those the device was asked to write
 * (the file system's journal included), as an SD card would be.
 *
 * <p>The minimal writer ({@code daemon/src/test/bench/minimal_writer.py}, fed by {@code mosquitto_sub -v}) is the least
 * a program can do to keep every reading: one WITHOUT ROWID table keyed (stream, ts), WAL, synchronous=NORMAL, a
 * commit every 2 s in one instance and every 60 s in the other. byre runs as its own JVM with the service's options
 * and a configuration of its load generator's sensors, zones and one watch per zone. Every database is seeded first
 * with the same number of rows over the past 14 days (an empty table makes any writer look cheap). Per load: device
 * bytes per reading published, commits, CPU seconds (utime + stime from /proc, both processes of a minimal writer
 * counted) and resident memory; ratios against the 2 s writer of the same run. Then byre's launch to its first
 * stored reading with that history.
 *
 * <p>Needs root for the loop devices (else it stops and says so), mosquitto and mosquitto_sub, python3. Everything it makes is
 * removed at the end. Usage: {@code daemon/src/test/bench/wear.sh [--seconds 60] [--seed-rows 1000000]}.
 */
public final class WearBench {
    static final Path SCRIPT = Path.of("daemon/src/test/bench/minimal_writer.py");

    record Load(String name, int sensors, int everyS, int zones) {}

    record Sample(long deviceBytes, double cpuS, long rssKb, long commits) {}

    public static void main(String[] args) throws Exception {
        int seconds = 60;
        long seedRows = 1_000_000;
        String commitEvery = "2s"; // byre's history.commit-every
        for (int i = 0; i + 1 < args.length; i += 2) {
            switch (args[i]) {
                case "--seconds": seconds = Integer.parseInt(args[i + 1]); break;
                case "--seed-rows": seedRows = Long.parseLong(args[i + 1]); break;
                case "--commit-every": commitEvery = args[i + 1]; break;
                default: throw new IllegalArgumentException("unknown option " + args[i] + " (--seconds N, --seed-rows N, --commit-every 2s)");
            }
        }
        if (!Files.isRegularFile(SCRIPT)) throw new IllegalStateException("run from the repository root: " + SCRIPT + " not found");
        // This process seeds byre's history itself: SQLite's native library must load from a folder of its own, not
        // from beside the first history on a loop file system, which could then not be unmounted.
        Path lib = Files.createTempDirectory("byre-wear-lib");
        byre.history.SqliteNative.prepare(lib);
        Runtime.getRuntime().addShutdownHook(new Thread(() -> {
            try (var walk = Files.walk(lib)) {
                walk.sorted(Comparator.reverseOrder()).forEach(f -> f.toFile().delete());
            } catch (IOException ignored) {
                // a temporary folder
            }
        }));
        List<String[]> table = new ArrayList<>();
        for (Load load : List.of(new Load("40 sensors every 10 s, 20 watches", 40, 10, 20), new Load("200 sensors every 1 s, 50 watches", 200, 1, 50))) {
            run(load, seconds, seedRows, commitEvery, table);
        }
        System.out.println();
        System.out.printf(Locale.ROOT, "| %-70s | %14s | %14s | %14s | %s |%n", "measure (" + seconds + " s per load, " + seedRows + " seeded rows each, byre commits every " + commitEvery + ")",
                "byre", "2 s writer", "60 s writer", "byre / 2 s writer");
        System.out.println("|---|---|---|---|---|");
        for (String[] r : table) System.out.printf(Locale.ROOT, "| %-70s | %14s | %14s | %14s | %s |%n", (Object[]) r);
        System.exit(0); // the load generator's client threads would keep the JVM alive
    }

    static void run(Load load, int seconds, long seedRows, String commitEvery, List<String[]> table) throws Exception {
        Path work = Files.createTempDirectory("byre-wear");
        List<Disk> disks = new ArrayList<>();
        List<Process> started = new ArrayList<>();
        try {
            Disk byreDisk = Disk.make(work, "byre");
            disks.add(byreDisk);
            Disk w2 = Disk.make(work, "w2");
            disks.add(w2);
            Disk w60 = Disk.make(work, "w60");
            disks.add(w60);
            Path db = byreDisk.dir.resolve("history.db");
            seedByre(db, load, seedRows);
            seedMinimal(w2.dir.resolve("minimal.db"), load, seedRows);
            seedMinimal(w60.dir.resolve("minimal.db"), load, seedRows);
            sync();
            try (Mosquitto m = Mosquitto.start(); HookSink sink = new HookSink()) {
                Path rules = Files.createDirectories(work.resolve("rules.d"));
                BenchRules.write(rules, load.zones, false);
                int admin = Mosquitto.freePort();
                Path cfg = work.resolve("byre.yaml");
                String yaml = LoadConfig.yaml(load.sensors, load.zones, m.uri(), null, "load", rules, db)
                        .replace("\n  keep-hour: 5y\n", "\n  keep-hour: 5y\n  commit-every: " + commitEvery + "\n");
                Files.writeString(cfg, BenchRules.config(yaml, sink, false)
                        + "\nadmin:\n  listen: 127.0.0.1:" + admin + "\n");
                ByreProcess byre = ByreProcess.launch(cfg, List.of());
                double startupS = Double.NaN;
                try (byre.testing.TestPublisher pub = new byre.testing.TestPublisher(m.uri())) {
                    String topic = LoadConfig.topic("load", 0, load.sensors, load.zones);
                    while (System.nanoTime() - byre.launchedNanos() < 60_000_000_000L) {
                        pub.publish(topic, "{\"v\":20.5,\"ts\":" + System.currentTimeMillis() + "}");
                        if (FootprintBench.metric(admin, "byre_history_rows_written") > 0) {
                            startupS = (System.nanoTime() - byre.launchedNanos()) / 1e9;
                            break;
                        }
                        Thread.sleep(20);
                    }
                }
                Process[] minimal2 = minimal(m.port(), w2.dir.resolve("minimal.db"), 2, "w2");
                Process[] minimal60 = minimal(m.port(), w60.dir.resolve("minimal.db"), 60, "w60");
                started.addAll(List.of(minimal2));
                started.addAll(List.of(minimal60));
                Thread.sleep(3000); // subscribed, and byre's start-up writes done
                Sample byre0 = new Sample(byreDisk.bytes(), cpuS(byre.pid()), 0, (long) FootprintBench.metric(admin, "byre_history_commits"));
                long[] dev0 = {w2.bytes(), w60.bytes()};
                double[] cpu0 = {cpuS(minimal2), cpuS(minimal60)};
                java.util.concurrent.CompletableFuture<LoadMain.Result> running = java.util.concurrent.CompletableFuture.supplyAsync(() -> {
                    try {
                        return LoadMain.run(LoadMain.Options.parse("--broker", m.uri(), "--rate", String.valueOf(load.sensors / (double) load.everyS),
                                "--sensors", String.valueOf(load.sensors), "--zones", String.valueOf(load.zones), "--duration", seconds + "s", "--qos", "1",
                                "--client-id", "wear-load"), new PrintStream(java.io.OutputStream.nullOutputStream()));
                    } catch (Exception e) {
                        throw new IllegalStateException(e);
                    }
                });
                // CPU over the second half of the load as well: byre's compiler has settled by then (steady state).
                Thread.sleep(seconds * 500L);
                double[] half = {cpuS(byre.pid()), cpuS(minimal2), cpuS(minimal60)};
                long halfNanos = System.nanoTime();
                LoadMain.Result r = running.get();
                double[] end = {cpuS(byre.pid()), cpuS(minimal2), cpuS(minimal60)};
                double halfMin = (System.nanoTime() - halfNanos) / 60e9;
                Thread.sleep(4000); // the last commits of byre and of the 2 s writer
                double byreCpu = cpuS(byre.pid()) - byre0.cpuS;
                long byreRss = FootprintBench.rssKb(byre.pid());
                long byreCommits = (long) FootprintBench.metric(admin, "byre_history_commits") - byre0.commits;
                double cpu2 = cpuS(minimal2) - cpu0[0];
                double cpu60 = cpuS(minimal60) - cpu0[1];
                long rss2 = FootprintBench.rssKb(minimal2[1].pid()) + FootprintBench.rssKb(minimal2[0].pid());
                long rss60 = FootprintBench.rssKb(minimal60[1].pid()) + FootprintBench.rssKb(minimal60[0].pid());
                // Everyone writes out what they hold (byre its open rollups, the writers their last batch), then
                // the file systems write back their dirty pages: what the device is asked to write in the end.
                String s2 = stopMinimal(minimal2);
                String s60 = stopMinimal(minimal60);
                int code = byre.stop(30);
                sync();
                double[] bytes = {byreDisk.bytes() - byre0.deviceBytes, w2.bytes() - dev0[0], w60.bytes() - dev0[1]};
                long c2 = count(s2, "commits");
                long c60 = count(s60, "commits");
                long readings = r.sent();
                String what = load.name + ": ";
                double perMin = 60.0 / Math.max(1, r.seconds());
                table.add(row(what + "device bytes per reading",
                        bytes[0] / readings, bytes[1] / readings, bytes[2] / readings, "%.0f"));
                table.add(new String[] {what + "device MB per hour at this rate", mb(bytes[0], r.seconds()), mb(bytes[1], r.seconds()), mb(bytes[2], r.seconds()),
                        String.format(Locale.ROOT, "60 s writer: %.1f x", bytes[0] / Math.max(1, bytes[2]))});
                table.add(row(what + "commits per reading", (double) byreCommits / readings, (double) c2 / readings, (double) c60 / readings, "%.3f"));
                table.add(row(what + "CPU seconds per minute", byreCpu * perMin, cpu2 * perMin, cpu60 * perMin, "%.2f"));
                table.add(row(what + "CPU seconds per minute, second half of the load", (end[0] - half[0]) / halfMin,
                        (end[1] - half[1]) / halfMin, (end[2] - half[2]) / halfMin, "%.2f"));
                table.add(row(what + "resident memory, MB (writer: python + mosquitto_sub)", byreRss / 1000.0, rss2 / 1000.0, rss60 / 1000.0, "%.1f"));
                table.add(new String[] {what + "launch to first stored reading, s (seeded history)", String.format(Locale.ROOT, "%.2f", startupS), "", "", ""});
                System.out.printf(Locale.ROOT, "%s: %d readings published in %.1f s (%d failed); byre exit %d; writers %s %s%n",
                        load.name, readings, r.seconds(), r.failed(), code, s2.strip(), s60.strip());
            }
        } finally {
            for (Process p : started) {
                if (p.isAlive()) {
                    p.destroy();
                    p.waitFor(5, TimeUnit.SECONDS);
                }
            }
            for (Disk d : disks) d.remove();
            try (var walk = Files.walk(work)) {
                walk.sorted(Comparator.reverseOrder()).forEach(f -> f.toFile().delete());
            }
        }
    }

    static String[] row(String what, double byre, double w2, double w60, String fmt) {
        return new String[] {what, String.format(Locale.ROOT, fmt, byre), String.format(Locale.ROOT, fmt, w2), String.format(Locale.ROOT, fmt, w60),
            w2 > 0 ? String.format(Locale.ROOT, "%.2f", byre / w2) : ""};
    }

    static String mb(double bytes, double seconds) {
        return String.format(Locale.ROOT, "%.1f", bytes / 1e6 * 3600 / Math.max(1, seconds));
    }

    /**
     * The same number of rows as the minimal writers get, through byre's own writer, over the past 14 days. The clock
     * follows the rows, so that rollups are written and rows packed into runs as they would have been live: the
     * measured run starts from a steady state, not from packing the whole history.
     */
    static void seedByre(Path db, Load load, long rows) {
        Instant now = Instant.now();
        FollowingClock clock = new FollowingClock();
        long stepMs = Duration.ofDays(14).toMillis() * load.sensors / Math.max(1, rows);
        long t0 = now.minus(Duration.ofDays(14)).toEpochMilli();
        clock.ms = t0;
        try (HistoryStore store = HistoryStore.open(db, clock)) {
            try (HistoryWriter w = HistoryWriter.start(store, Retention.DEFAULT, clock)) {
                for (long i = 0; i < rows; i++) {
                    int s = (int) (i % load.sensors);
                    long ts = t0 + (i / load.sensors) * stepMs;
                    clock.ms = ts + 1000;
                    w.appendWaiting(StreamKey.sensor(LoadConfig.sensorId(s, load.sensors)), ts, 15.0 + (i % 97) / 10.0, null);
                }
                clock.ms = now.toEpochMilli();
                w.flush(Duration.ofMinutes(5));
                long deadline = System.nanoTime() + Duration.ofMinutes(5).toNanos();
                while (w.stats().sealPending() && System.nanoTime() < deadline) java.util.concurrent.locks.LockSupport.parkNanos(20_000_000);
            }
            store.checkpoint();
        }
    }

    /** A clock set by hand: the seeding's time, moved along with the rows it appends. */
    static final class FollowingClock extends Clock {
        volatile long ms;

        @Override public ZoneId getZone() { return ZoneOffset.UTC; }

        @Override public Clock withZone(ZoneId zone) { return this; }

        @Override public Instant instant() { return Instant.ofEpochMilli(ms); }
    }

    /** Seeds under the topics the load publishes, as {@link #seedByre} seeds under its sensor ids: both start in steady state. */
    static void seedMinimal(Path db, Load load, long rows) throws Exception {
        Path topics = db.resolveSibling("topics.txt");
        StringBuilder sb = new StringBuilder();
        for (int i = 0; i < load.sensors; i++) sb.append(LoadConfig.topic("load", i, load.sensors, load.zones)).append('\n');
        Files.writeString(topics, sb);
        Process p = new ProcessBuilder("python3", SCRIPT.toString(), db.toString(), "2", String.valueOf(rows), topics.toString())
                .redirectErrorStream(true).start();
        String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        if (p.waitFor() != 0) throw new IllegalStateException("seeding the minimal writer failed: " + out);
    }

    /** mosquitto_sub piped into the minimal writer; [0] the subscriber, [1] the writer. */
    static Process[] minimal(int port, Path db, int commitEveryS, String id) throws IOException {
        List<Process> ps = ProcessBuilder.startPipeline(List.of(
                new ProcessBuilder("mosquitto_sub", "-h", "127.0.0.1", "-p", String.valueOf(port), "-q", "1", "-v", "-t", "load/#",
                        "-i", "wear-" + id + "-" + ProcessHandle.current().pid()),
                new ProcessBuilder("python3", SCRIPT.toString(), db.toString(), String.valueOf(commitEveryS))));
        return ps.toArray(new Process[0]);
    }

    /** Ends the subscriber; the writer commits what it holds and prints its counts. */
    static String stopMinimal(Process[] pair) throws Exception {
        pair[0].destroy();
        pair[0].waitFor(10, TimeUnit.SECONDS);
        if (!pair[1].waitFor(30, TimeUnit.SECONDS)) pair[1].destroy();
        return new String(pair[1].getInputStream().readAllBytes(), StandardCharsets.UTF_8);
    }

    static long count(String json, String key) {
        java.util.regex.Matcher m = java.util.regex.Pattern.compile("\"" + key + "\": (\\d+)").matcher(json);
        return m.find() ? Long.parseLong(m.group(1)) : -1;
    }

    static double cpuS(Process[] pair) throws IOException {
        return cpuS(pair[0].pid()) + cpuS(pair[1].pid());
    }

    /** utime + stime of a process in seconds (clock ticks of 1/100 s). */
    static double cpuS(long pid) throws IOException {
        String stat = Files.readString(Path.of("/proc/" + pid + "/stat"));
        String[] f = stat.substring(stat.lastIndexOf(')') + 2).split(" ");
        return (Long.parseLong(f[11]) + Long.parseLong(f[12])) / 100.0;
    }

    static void sync() throws Exception {
        new ProcessBuilder("sync").inheritIO().start().waitFor();
    }

    /** A fresh ext4 file system on a loop device, mounted on a folder of the work folder. */
    static final class Disk {
        final Path dir;
        final Path image;
        final String loop;

        private Disk(Path dir, Path image, String loop) {
            this.dir = dir;
            this.image = image;
            this.loop = loop;
        }

        static Disk make(Path work, String name) throws Exception {
            Path dir = Files.createDirectories(work.resolve(name));
            Path image = work.resolve(name + ".img");
            try {
                sh("truncate", "-s", "512M", image.toString());
                String loop = sh("losetup", "-f", "--show", image.toString()).strip();
                try {
                    sh("mkfs.ext4", "-q", "-F", loop);
                    sh("mount", loop, dir.toString());
                    return new Disk(dir, image, loop);
                } catch (IOException e) {
                    sh("losetup", "-d", loop);
                    throw e;
                }
            } catch (IOException e) {
                Files.deleteIfExists(image);
                throw new IllegalStateException("cannot make a loop file system for " + name + " (needs root, losetup, mkfs.ext4): "
                    + e.getMessage().strip() + ". Without one, compare /proc/PID/io write_bytes of the writers instead, knowing that it"
                    + " over-counts scattered small writes (ext4 counts a whole large folio for each dirtied page).");
            }
        }

        /** Bytes the device was asked to write so far (sectors written, field 7 of its stat). */
        long bytes() throws IOException {
            String[] f = Files.readString(Path.of("/sys/block/" + Path.of(loop).getFileName() + "/stat")).trim().split("\\s+");
            return Long.parseLong(f[6]) * 512;
        }

        void remove() {
            try {
                sh("umount", dir.toString());
                sh("losetup", "-d", loop);
                Files.deleteIfExists(image);
            } catch (Exception e) {
                System.out.println("cleaning up " + loop + " failed: " + e.getMessage());
            }
        }

        private static String sh(String... cmd) throws Exception {
            Process p = new ProcessBuilder(cmd).redirectErrorStream(true).start();
            String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
            if (p.waitFor() != 0) throw new IOException(String.join(" ", cmd) + ": " + out);
            return out;
        }
    }
}
