package byre.notify;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.json.Json;
import java.io.BufferedReader;
import java.io.InputStreamReader;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.Set;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * byre's alerting in a separate JVM, killed with SIGKILL (Process.destroyForcibly on Linux) at random moments
 * between commit and delivery, 20 times; after a final restart every committed event has reached the receiver,
 * which de-duplicates by id.
 */
class KillNineTest {
    @TempDir
    Path dir;

    Process worker(Path db, Receiver r, String mode, int run) throws Exception {
        String java = Path.of(System.getProperty("java.home"), "bin", "java").toString();
        return new ProcessBuilder(java, "-Xmx64m", "-XX:TieredStopAtLevel=1", "-cp", System.getProperty("java.class.path"),
                CrashWorker.class.getName(), db.toString(), r.url().toString(), mode, Integer.toString(run))
                .redirectError(ProcessBuilder.Redirect.DISCARD).start();
    }

    @Test
    void everyCommittedEventArrivesAfterTwentyKills() throws Exception {
        Path db = dir.resolve("history.db");
        Random rnd = new Random(20260714);
        Set<String> committed = new HashSet<>();
        List<Process> live = new ArrayList<>();
        try (Receiver receiver = new Receiver()) {
            for (int run = 0; run < 20; run++) {
                Process p = worker(db, receiver, "raise", run);
                live.add(p);
                BufferedReader out = new BufferedReader(new InputStreamReader(p.getInputStream(), StandardCharsets.UTF_8));
                String line;
                while ((line = out.readLine()) != null && !line.equals("READY")) {
                    // log lines
                }
                assertEquals("READY", line, "worker " + run + " did not start");
                long killAt = System.nanoTime() + (50 + rnd.nextInt(400)) * 1_000_000L;
                Thread reader = new Thread(() -> {
                    try {
                        String l;
                        while ((l = out.readLine()) != null) {
                            if (l.startsWith("C ")) synchronized (committed) {
                                committed.add(l.substring(2));
                            }
                        }
                    } catch (Exception ignored) {
                        // killed
                    }
                });
                reader.start();
                while (System.nanoTime() < killAt) Thread.sleep(5);
                p.destroyForcibly(); // SIGKILL: no shutdown hooks, no clean close
                assertTrue(p.waitFor(10, TimeUnit.SECONDS));
                reader.join(5000);
            }
            Process drain = worker(db, receiver, "drain", 99);
            live.add(drain);
            BufferedReader out = new BufferedReader(new InputStreamReader(drain.getInputStream(), StandardCharsets.UTF_8));
            List<String> lines = new ArrayList<>();
            String l;
            while ((l = out.readLine()) != null) if (l.matches("READY|DONE|STUCK.*")) lines.add(l);
            assertTrue(drain.waitFor(75, TimeUnit.SECONDS));
            assertEquals(List.of("READY", "DONE"), lines);

            Set<String> received = new HashSet<>();
            for (Receiver.Request q : receiver.requests()) received.add((String) ((Map<?, ?>) Json.parse(q.body())).get("id"));
            Set<String> lost = new HashSet<>(committed);
            lost.removeAll(received);
            assertTrue(committed.size() > 20, "the workers committed events: " + committed.size());
            assertEquals(Set.of(), lost, "committed but never delivered");
            System.out.println("kill -9 test: " + committed.size() + " events committed, " + receiver.requests().size()
                    + " requests received (" + (receiver.requests().size() - received.size()) + " duplicates)");
        } finally {
            for (Process p : live) p.destroyForcibly(); // never leave a worker behind when an assertion fails
        }
    }
}
