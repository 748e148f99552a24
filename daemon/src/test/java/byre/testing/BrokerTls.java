package byre.testing;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.concurrent.TimeUnit;

/**
 * What the bridge tests need to run two mosquittos over TLS with logins, made with the tools Debian ships:
 * {@code openssl} for a test CA and a broker certificate for 127.0.0.1, {@code mosquitto_passwd} for a password file.
 */
public final class BrokerTls {
    private BrokerTls() {}

    /** Whether openssl and mosquitto_passwd are installed (CI installs both). */
    public static boolean toolsPresent() {
        return Files.isExecutable(Path.of("/usr/bin/openssl")) && Files.isExecutable(Path.of("/usr/bin/mosquitto_passwd"));
    }

    /** {@code ca.pem}, and {@code server.pem} with {@code server.key} for 127.0.0.1 signed by it, in {@code dir}. */
    public static void makeCertificates(Path dir) throws IOException, InterruptedException {
        String ca = dir.resolve("ca").toString();
        String server = dir.resolve("server").toString();
        run(dir, "/usr/bin/openssl", "req", "-x509", "-newkey", "rsa:2048", "-nodes", "-days", "2", "-subj", "/CN=byre test CA",
                "-keyout", ca + ".key", "-out", ca + ".pem");
        run(dir, "/usr/bin/openssl", "req", "-newkey", "rsa:2048", "-nodes", "-subj", "/CN=127.0.0.1",
                "-keyout", server + ".key", "-out", server + ".csr");
        Files.writeString(dir.resolve("san.ext"), "subjectAltName=IP:127.0.0.1\n");
        run(dir, "/usr/bin/openssl", "x509", "-req", "-in", server + ".csr", "-CA", ca + ".pem", "-CAkey", ca + ".key",
                "-CAcreateserial", "-days", "2", "-extfile", dir.resolve("san.ext").toString(), "-out", server + ".pem");
    }

    /**
     * A barn broker bridged to a central one by the shipped drop-in ({@code config/mosquitto-bridge.conf}, only its
     * placeholders, CA path, password and reconnect delay substituted): the centre has a TLS listener with a login
     * for the bridge and a plain anonymous one for the test's clients, and keeps sessions across a restart.
     * Start them with {@link Mosquitto#startConfigured}.
     */
    public record Bridged(int centralTls, int centralPlain, int barnPort, String centralConf, String barnConf) {
        public static Bridged prepare(Path dir, String site, Path repositoryRoot) throws IOException, InterruptedException {
            makeCertificates(dir);
            passwordFile(dir.resolve("central.passwd"), "byre-" + site, "bridge-pw");
            int centralTls = Mosquitto.freePort();
            int centralPlain = Mosquitto.freePort();
            int barnPort = Mosquitto.freePort();
            String user = System.getProperty("user.name");
            Files.createDirectories(dir.resolve("central-state"));
            String centralConf = String.join("\n",
                    "per_listener_settings true",
                    "user " + user,
                    "persistence true",
                    "persistence_location " + dir.resolve("central-state") + "/",
                    "listener " + centralTls + " 127.0.0.1",
                    "cafile " + dir.resolve("ca.pem"),
                    "certfile " + dir.resolve("server.pem"),
                    "keyfile " + dir.resolve("server.key"),
                    "allow_anonymous false",
                    "password_file " + dir.resolve("central.passwd"),
                    // the test's own clients, plain and anonymous, on a second loopback listener
                    "listener " + centralPlain + " 127.0.0.1",
                    "allow_anonymous true");
            String dropIn = Files.readString(repositoryRoot.resolve("config/mosquitto-bridge.conf"))
                    .replace("@SITE@", site)
                    .replace("@CENTRAL@", "127.0.0.1:" + centralTls)
                    .replace("/etc/byre/central-ca.pem", dir.resolve("ca.pem").toString())
                    .replace("remote_password CHANGE-ME", "remote_password bridge-pw")
                    .replace("restart_timeout 2 30", "restart_timeout 1 2");
            assertTrue(dropIn.contains("remote_password bridge-pw") && dropIn.contains("restart_timeout 1 2"),
                    "the drop-in's lines the test substitutes have changed");
            String barnConf = "user " + user + "\nlistener " + barnPort + " 127.0.0.1\nallow_anonymous true\n" + dropIn;
            return new Bridged(centralTls, centralPlain, barnPort, centralConf, barnConf);
        }
    }

    /** A mosquitto password file holding one login. */
    public static void passwordFile(Path file, String user, String password) throws IOException, InterruptedException {
        run(file.getParent(), "/usr/bin/mosquitto_passwd", "-b", "-c", file.toString(), user, password);
    }

    private static void run(Path dir, String... argv) throws IOException, InterruptedException {
        Path log = dir.resolve("tool.log");
        Process p = new ProcessBuilder(argv).redirectErrorStream(true).redirectOutput(log.toFile()).start();
        assertTrue(p.waitFor(30, TimeUnit.SECONDS), String.join(" ", argv) + " did not finish");
        assertEquals(0, p.exitValue(), String.join(" ", argv) + ": " + Files.readString(log));
    }
}
