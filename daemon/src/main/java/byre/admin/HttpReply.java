package byre.admin;

import com.sun.net.httpserver.HttpExchange;
import java.io.IOException;
import java.io.OutputStream;
import java.nio.charset.StandardCharsets;

/** Sends a whole response of the JDK's HTTP server: never cached, and no body for a HEAD request. */
public final class HttpReply {
    private HttpReply() {}

    /** Sends {@code body} as {@code contentType} with {@code code}; headers set on {@code ex} before are kept. */
    public static void send(HttpExchange ex, int code, String contentType, String body) throws IOException {
        byte[] bytes = body.getBytes(StandardCharsets.UTF_8);
        ex.getResponseHeaders().set("Content-Type", contentType);
        ex.getResponseHeaders().set("Cache-Control", "no-store");
        boolean head = ex.getRequestMethod().equals("HEAD");
        ex.sendResponseHeaders(code, head ? -1 : bytes.length);
        if (!head) {
            try (OutputStream os = ex.getResponseBody()) {
                os.write(bytes);
            }
        }
    }
}
