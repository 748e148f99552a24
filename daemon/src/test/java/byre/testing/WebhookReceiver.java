package byre.testing;

import com.sun.net.httpserver.HttpServer;
import java.io.IOException;
import java.net.InetSocketAddress;
import java.nio.charset.StandardCharsets;
import java.util.List;
import java.util.concurrent.CopyOnWriteArrayList;

/** A real HTTP server on 127.0.0.1 that records every POSTed body and answers 200. */
public final class WebhookReceiver implements AutoCloseable {
    private final HttpServer server;
    private final List<String> bodies = new CopyOnWriteArrayList<>();

    public WebhookReceiver() throws IOException {
        server = HttpServer.create(new InetSocketAddress("127.0.0.1", 0), 0);
        server.createContext("/hook", ex -> {
            bodies.add(new String(ex.getRequestBody().readAllBytes(), StandardCharsets.UTF_8));
            ex.sendResponseHeaders(200, -1);
            ex.close();
        });
        server.start();
    }

    public String url() {
        return "http://127.0.0.1:" + server.getAddress().getPort() + "/hook";
    }

    public List<String> bodies() {
        return bodies;
    }

    @Override
    public void close() {
        server.stop(0);
    }
}
