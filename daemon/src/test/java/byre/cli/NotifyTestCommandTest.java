package byre.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.testing.SmtpServer;
import com.sun.net.httpserver.HttpServer;
import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.net.InetSocketAddress;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.concurrent.CopyOnWriteArrayList;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** {@code byre notify-test} and {@code byre ack} against real HTTP servers on 127.0.0.1. */
class NotifyTestCommandTest {

    @TempDir
    Path dir;

    static CliRun run(String... args) {
        return CliRun.of(args);
    }

    HttpServer server(int status, String answer, List<String> bodies) throws Exception {
        HttpServer s = HttpServer.create(new InetSocketAddress("127.0.0.1", 0), 0);
        s.createContext("/", ex -> {
            bodies.add(ex.getRequestMethod() + " " + ex.getRequestURI().getPath() + " " + ex.getRequestHeaders().getFirst("Authorization")
                    + " " + new String(ex.getRequestBody().readAllBytes(), StandardCharsets.UTF_8));
            byte[] b = answer.getBytes(StandardCharsets.UTF_8);
            ex.sendResponseHeaders(status, b.length);
            ex.getResponseBody().write(b);
            ex.close();
        });
        s.start();
        return s;
    }

    Path config(int hookPort, int adminPort) throws Exception {
        Files.writeString(dir.resolve("admin.token"), "t0ken-larkmoor\n");
        Path f = dir.resolve("byre.yaml");
        Files.writeString(f, """
                site: larkmoor
                notify:
                  night-phone: { type: webhook, url: "http://127.0.0.1:%d/hook" }
                admin: { listen: "127.0.0.1:%d", token-file: admin.token }
                """.formatted(hookPort, adminPort));
        return f;
    }

    @Test
    void sendsATestEventAndReportsSuccess() throws Exception {
        List<String> got = new CopyOnWriteArrayList<>();
        HttpServer s = server(204, "", got);
        try {
            CliRun r = run("notify-test", "night-phone", "--config", config(s.getAddress().getPort(), 0).toString());
            assertEquals(0, r.code(), r.err());
            assertTrue(r.out().startsWith("ok: test event "), r.out());
            assertTrue(got.get(0).contains("\"event\":\"test\""), got.get(0));
        } finally {
            s.stop(0);
        }
    }

    @Test
    void reportsTheHttpStatusAndBodyExcerptAndExitsOne() throws Exception {
        HttpServer s = server(401, "{\"error\":\"bad app token\"}", new CopyOnWriteArrayList<>());
        try {
            CliRun r = run("notify-test", "night-phone", "--config", config(s.getAddress().getPort(), 0).toString());
            assertEquals(1, r.code());
            assertTrue(r.out().contains("FAILED (http-status): night-phone (webhook): HTTP 401 from http://127.0.0.1:"), r.out());
            assertTrue(r.out().contains("{\"error\":\"bad app token\"}"), r.out());
        } finally {
            s.stop(0);
        }
    }

    @Test
    void anEmailChannelWhoseServerRefusesTheLoginPrintsTheReplyAndExitsOne() throws Exception {
        try (SmtpServer smtp = new SmtpServer()) {
            smtp.authReply = "535 5.7.8 Authentication credentials invalid";
            Files.writeString(dir.resolve("smtp.secret"), "not-the-password\n");
            Path f = dir.resolve("mail.yaml");
            Files.writeString(f, """
                    site: larkmoor
                    notify:
                      office: { type: email, smtp: "127.0.0.1:%d", from: byre@larkmoor.test, to: office@larkmoor.test,
                                username: byre, password-file: smtp.secret, tls: none }
                    """.formatted(smtp.port()));
            CliRun r = run("notify-test", "office", "--config", f.toString());
            assertEquals(1, r.code(), r.err());
            assertEquals("FAILED (smtp-reply): office (email): AUTH PLAIN refused: 535 5.7.8 Authentication credentials invalid\n", r.out());
            assertTrue(!r.out().contains("not-the-password") && !r.err().contains("not-the-password"), "the password never shows");
        }
    }

    @Test
    void anUnknownChannelGetsADidYouMeanAndExitTwo() throws Exception {
        CliRun r = run("notify-test", "night-phon", "--config", config(9, 0).toString());
        assertEquals(2, r.code());
        assertTrue(r.err().contains("no channel named 'night-phon'") && r.err().contains("(did you mean 'night-phone'?)"), r.err());
    }

    @Test
    void ackPostsToTheAdminApiWithTheToken() throws Exception {
        List<String> got = new CopyOnWriteArrayList<>();
        // the admin API's answer, as AdminServer sends it for POST /ack
        HttpServer admin = server(200, "{\"outcome\":\"acknowledged\",\"message\":\"acknowledged: heat-stress in cow-shed, open 42 min\"}\n", got);
        try {
            CliRun r = run("ack", "k7q2m9xw3c", "--by", "Dana", "--config", config(9, admin.getAddress().getPort()).toString());
            assertEquals(0, r.code(), r.err());
            assertEquals("acknowledged: heat-stress in cow-shed, open 42 min\n", r.out(), "one plain sentence, no JSON");
            assertEquals("POST /ack Bearer t0ken-larkmoor {\"incident\":\"k7q2m9xw3c\",\"by\":\"Dana\"}", got.get(0));
        } finally {
            admin.stop(0);
        }
    }

    @Test
    void ackOfAnUnknownIncidentSaysSoInASentence() throws Exception {
        HttpServer admin = server(404, "{\"outcome\":\"unknown-incident\",\"message\":\"no open incident 'k7q2m9xw3d'; open: k7q2m9xw3c\"}\n",
                new CopyOnWriteArrayList<>());
        try {
            CliRun r = run("ack", "k7q2m9xw3d", "--by", "Dana", "--config", config(9, admin.getAddress().getPort()).toString());
            assertEquals(1, r.code());
            assertEquals("", r.out());
            assertEquals("byre: no open incident 'k7q2m9xw3d'; open: k7q2m9xw3c\n", r.err());
        } finally {
            admin.stop(0);
        }
    }
}
