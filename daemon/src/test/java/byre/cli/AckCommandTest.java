package byre.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;

import byre.json.Json;
import com.sun.net.httpserver.HttpServer;
import java.net.InetSocketAddress;
import java.net.URI;
import java.nio.charset.StandardCharsets;
import java.util.Map;
import java.util.concurrent.atomic.AtomicReference;
import org.junit.jupiter.api.Test;

/** {@code byre ack} against the JDK's HTTP server on loopback standing in for the daemon's admin API. */
class AckCommandTest {
    @Test
    void theNameSentIsOneShortLineAndTheTokenIsABearerToken() throws Exception {
        AtomicReference<String> body = new AtomicReference<>();
        AtomicReference<String> auth = new AtomicReference<>();
        HttpServer http = HttpServer.create(new InetSocketAddress("127.0.0.1", 0), 4);
        http.createContext("/ack", ex -> {
            body.set(new String(ex.getRequestBody().readAllBytes(), StandardCharsets.UTF_8));
            auth.set(ex.getRequestHeaders().getFirst("Authorization"));
            byte[] answer = "{\"outcome\":\"acknowledged\",\"message\":\"acknowledged\"}".getBytes(StandardCharsets.UTF_8);
            ex.sendResponseHeaders(200, answer.length);
            ex.getResponseBody().write(answer);
            ex.close();
        });
        http.start();
        try {
            int code = AckCommand.post(URI.create("http://127.0.0.1:" + http.getAddress().getPort() + "/ack"), "t0ken", "i1",
                    "sam\nERROR byre - forged line" + "z".repeat(100));
            assertEquals(Main.OK, code);
            Map<?, ?> sent = (Map<?, ?>) Json.parse(body.get());
            assertEquals("i1", sent.get("incident"));
            String by = (String) sent.get("by");
            assertEquals("sam ERROR byre - forged line" + "z".repeat(64 - 28), by);
            assertEquals("Bearer t0ken", auth.get());
        } finally {
            http.stop(0);
        }
    }
}
