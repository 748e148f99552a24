package byre.testing;

import java.io.IOException;
import java.net.InetSocketAddress;
import java.net.Socket;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.concurrent.TimeUnit;

/**
 * Debian's mosquitto, started by a test on a free loopback port with its own configuration (CI
 * installs the package; nothing is started by hand). Unbounded queues so a slow subscriber loses
 * nothing at QoS 1; stopped and its folder removed by {@link #close()}.
 */
public final class Mosquitto implements AutoCloseable {
    private final Process process;
    private final int port;
    private final Path dir;

    private Mosquitto(Process process, int port, Path dir) {
        this.process = process;
        this.port = port;
        this.dir = dir;
    }

    public static Mosquitto start() throws IOException, InterruptedException {
        return start(freePort());
    }

    /** Starts on a given port (used to restart a broker on the same address). */
    public static Mosquitto start(int port) throws IOException, InterruptedException {
        return start(port, null);
    }

    /**
     * Starts on a given port; with a {@code stateDir}, the broker keeps sessions, queued messages and retained
     * messages in a file there, saved after every change, so that they survive a crash and a restart with the
     * same folder (the folder is not removed by {@link #close()}).
     */
    public static Mosquitto start(int port, Path stateDir) throws IOException, InterruptedException {
        String persistence = stateDir == null ? "persistence false"
                : "persistence true\npersistence_location " + stateDir.toAbsolutePath() + "/\nautosave_interval 1\nautosave_on_changes true"
                // run as root, mosquitto would switch to user 'mosquitto', which cannot write the test's folder
                + "\nuser " + System.getProperty("user.name");
        return startConfigured(port, String.join("\n",
                "listener " + port + " 127.0.0.1",
                "allow_anonymous true",
                persistence,
                "max_queued_messages 0",
                "max_queued_bytes 0",
                "max_inflight_messages 0",
                // as the barn broker's drop-in sets it: without, each packet to byre waits ~40 ms for a TCP acknowledgement
                "set_tcp_nodelay true"));
    }

    /**
     * Starts with the given configuration text (listeners included) and waits until {@code port}, one of its
     * listeners, and every one of {@code alsoPorts} accept connections (mosquitto opens its listeners one after
     * the other); errors go to the log in the broker's own folder.
     */
    public static Mosquitto startConfigured(int port, String configuration, int... alsoPorts) throws IOException, InterruptedException {
        Path dir = Files.createTempDirectory("byre-mosquitto");
        Path conf = dir.resolve("mosquitto.conf");
        Files.writeString(conf, configuration + "\nlog_dest stderr\nlog_type error\n");
        String exe = Files.isExecutable(Path.of("/usr/sbin/mosquitto")) ? "/usr/sbin/mosquitto" : "mosquitto";
        Process p = new ProcessBuilder(exe, "-c", conf.toString())
                .redirectErrorStream(true).redirectOutput(dir.resolve("mosquitto.log").toFile()).start();
        Mosquitto m = new Mosquitto(p, port, dir);
        long deadline = System.nanoTime() + Duration.ofSeconds(10).toNanos();
        while (System.nanoTime() < deadline) {
            if (!p.isAlive()) {
                throw new IOException("mosquitto exited: " + Files.readString(dir.resolve("mosquitto.log")));
            }
            if (listening(port) && java.util.Arrays.stream(alsoPorts).allMatch(Mosquitto::listening)) return m;
            Thread.sleep(20);
        }
        m.close();
        throw new IOException("mosquitto did not listen on " + port + " " + java.util.Arrays.toString(alsoPorts) + " within 10 s");
    }

    private static boolean listening(int port) {
        try (Socket s = new Socket()) {
            s.connect(new InetSocketAddress("127.0.0.1", port), 200);
            return true;
        } catch (IOException notYet) {
            return false;
        }
    }

    public String uri() {
        return "tcp://127.0.0.1:" + port;
    }

    public int port() {
        return port;
    }

    /** Kills the broker at once (SIGKILL), as a crash would; its own folder goes too (a state folder stays). */
    public void kill() throws InterruptedException {
        process.destroyForcibly();
        process.waitFor(5, TimeUnit.SECONDS);
        removeFolder();
    }

    @Override
    public void close() throws InterruptedException {
        process.destroy();
        if (!process.waitFor(5, TimeUnit.SECONDS)) kill();
        removeFolder();
    }

    private void removeFolder() {
        if (!Files.exists(dir)) return;
        try (var walk = Files.walk(dir)) {
            walk.sorted(java.util.Comparator.reverseOrder()).forEach(f -> f.toFile().delete());
        } catch (IOException ignored) {
            // temporary folder
        }
    }

    public static int freePort() throws IOException {
        return byre.mqtt.EmbeddedBroker.freePort("127.0.0.1");
    }
}
