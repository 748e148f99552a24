package byre.notify;

import com.sun.net.httpserver.HttpServer;
import java.io.IOException;
import java.net.InetSocketAddress;
import java.net.URI;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.concurrent.atomic.AtomicInteger;

/** A real HTTP server on 127.0.0.1 that records what it is sent and answers with the status the test sets. */
final class Receiver implements AutoCloseable {
    record Request(String body, Map<String, List<String>> headers) {
        String header(String name) {
            for (var e : headers.entrySet()) if (e.getKey().equalsIgnoreCase(name)) return e.getValue().get(0);
            return null;
        }
    }

    final HttpServer server;
    final List<Request> requests = new ArrayList<>();
    final AtomicInteger status = new AtomicInteger(200);
    volatile long delayMs;

    Receiver() throws IOException {
        this(0);
    }

    Receiver(int port) throws IOException {
        server = HttpServer.create(new InetSocketAddress("127.0.0.1", port), 0);
        server.createContext("/hook", ex -> {
            String body = new String(ex.getRequestBody().readAllBytes(), StandardCharsets.UTF_8);
            int s = status.get();
            if (delayMs > 0) {
                try {
                    Thread.sleep(delayMs);
                } catch (InterruptedException e) {
                    Thread.currentThread().interrupt();
                }
            }
            synchronized (requests) {
                requests.add(new Request(body, Map.copyOf(ex.getRequestHeaders())));
            }
            byte[] answer = (s == 200 ? "thanks" : "receiver is having a bad day: database locked").getBytes(StandardCharsets.UTF_8);
            ex.sendResponseHeaders(s, answer.length);
            ex.getResponseBody().write(answer);
            ex.close();
        });
        server.setExecutor(java.util.concurrent.Executors.newFixedThreadPool(2));
        server.start();
    }

    URI url() {
        return URI.create("http://127.0.0.1:" + server.getAddress().getPort() + "/hook");
    }

    List<Request> requests() {
        synchronized (requests) {
            return List.copyOf(requests);
        }
    }

    @Override
    public void close() {
        server.stop(0);
        ((java.util.concurrent.ExecutorService) server.getExecutor()).shutdownNow();
    }
}
