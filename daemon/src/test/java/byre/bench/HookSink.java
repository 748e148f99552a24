package byre.bench;

import com.sun.net.httpserver.HttpServer;
import java.io.IOException;
import java.io.InputStream;
import java.net.InetSocketAddress;
import java.nio.charset.StandardCharsets;
import java.util.concurrent.BlockingQueue;
import java.util.concurrent.Executors;
import java.util.concurrent.LinkedBlockingQueue;
import java.util.concurrent.atomic.AtomicLong;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * The receiving end of byre's webhook channels in the benchmarks: a JDK HttpServer on 127.0.0.1 that answers 200 to
 * everything, counts requests, and queues each request to {@code /probe} with its arrival time and event kind.
 */
final class HookSink implements AutoCloseable {
    record Arrival(long nanos, String event, String body) {}

    private static final Pattern EVENT = Pattern.compile("\"event\"\\s*:\\s*\"([a-z-]+)\"");

    private final HttpServer server;
    final AtomicLong requests = new AtomicLong();
    final BlockingQueue<Arrival> probes = new LinkedBlockingQueue<>();

    HookSink() throws IOException {
        server = HttpServer.create(new InetSocketAddress("127.0.0.1", 0), 64);
        server.createContext("/", ex -> {
            long now = System.nanoTime();
            String body;
            try (InputStream in = ex.getRequestBody()) {
                body = new String(in.readAllBytes(), StandardCharsets.UTF_8);
            }
            requests.incrementAndGet();
            if (ex.getRequestURI().getPath().startsWith("/probe")) {
                Matcher m = EVENT.matcher(body);
                probes.add(new Arrival(now, m.find() ? m.group(1) : "?", body));
            }
            ex.sendResponseHeaders(200, -1);
            ex.close();
        });
        server.setExecutor(Executors.newFixedThreadPool(2, r -> {
            Thread t = new Thread(r, "hook-sink");
            t.setDaemon(true);
            return t;
        }));
        server.start();
    }

    String url(String path) {
        return "http://127.0.0.1:" + server.getAddress().getPort() + path;
    }

    @Override
    public void close() {
        server.stop(0);
    }
}
