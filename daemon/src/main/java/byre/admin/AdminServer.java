package byre.admin;

import byre.config.Secret;
import byre.json.Json;
import byre.json.JsonWriter;
import byre.rules.ZoneReading;
import com.sun.net.httpserver.HttpExchange;
import com.sun.net.httpserver.HttpServer;
import java.io.IOException;
import java.io.InputStream;
import java.net.InetSocketAddress;
import java.nio.charset.StandardCharsets;
import java.security.MessageDigest;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.Map;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.function.Supplier;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The admin HTTP listener (loopback by default) on the JDK's own server:
 * <ul>
 * <li>{@code GET /metrics}: Prometheus text format;</li>
 * <li>{@code GET /health}: 200 when healthy, else 503; JSON body listing what is not;</li>
 * <li>{@code GET /status}: current zone values with their age, and open alerts when an {@link AlertSource} is set;</li>
 * <li>{@code POST /ack}: body {@code {"incident":"…","by":"…"}}, needs {@code Authorization: Bearer <token>};
 *     401 without it, 404 when no {@link AckHandler} is set or the incident is unknown.</li>
 * </ul>
 * A few worker threads and small request limits: it serves one operator and one scraper, never the internet.
 * A request must arrive whole (request line, headers and body) within {@link #DEFAULT_READ_TIMEOUT}; a client that
 * sends slower has its connection closed, so slow or stalled clients cannot hold the workers and keep {@code /health}
 * (the watchdog's question) from being answered. The token is compared in constant time and never logged.
 */
public final class AdminServer implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(AdminServer.class);
    /** Largest request body accepted ({@code /ack} needs a few dozen bytes). */
    static final int MAX_BODY_BYTES = 4096;
    static final String PROMETHEUS_TYPE = "text/plain; version=0.0.4; charset=utf-8";
    /** Time a client has to send a whole request; honest ones on the farm LAN need milliseconds. */
    static final Duration DEFAULT_READ_TIMEOUT = Duration.ofSeconds(5);
    /** Worker threads (idle ones end after 30 s): more than the slow clients one request timeout can gather easily. */
    static final int WORKERS = 8;

    private final HttpServer server;
    private final ExecutorService pool;
    private final ReadDeadlines deadlines;
    private final byte[] token;
    private final Supplier<String> metrics;
    private final HealthMonitor health;
    private final LiveValues values;
    private final Clock clock;
    private final String site;
    private volatile AlertSource alerts;
    private volatile AckHandler ack;
    private volatile Runnable historyWrite;
    /** The last {@code POST /history/write} that wrote (guarded by this). */
    private Instant lastHistoryWrite;
    static final Duration HISTORY_WRITE_EVERY = Duration.ofSeconds(10);

    private AdminServer(HttpServer server, ExecutorService pool, ReadDeadlines deadlines, Secret token, Supplier<String> metrics,
                        HealthMonitor health, LiveValues values, Clock clock, String site) {
        this.server = server;
        this.pool = pool;
        this.deadlines = deadlines;
        this.token = token == null ? null : token.reveal().strip().getBytes(StandardCharsets.UTF_8);
        this.metrics = metrics;
        this.health = health;
        this.values = values;
        this.clock = clock;
        this.site = site;
    }

    /**
     * Binds and starts the listener.
     *
     * @param token   the bearer token for {@code POST /ack}, or null (then every acknowledgement gets 401)
     * @param metrics the Prometheus scrape, e.g. {@code registry::scrape}
     * @throws IOException when the address cannot be bound (in use, not local)
     */
    public static AdminServer start(String host, int port, Secret token, Supplier<String> metrics, HealthMonitor health,
                                    LiveValues values, Clock clock, String site) throws IOException {
        return start(host, port, token, metrics, health, values, clock, site, DEFAULT_READ_TIMEOUT);
    }

    /** As above, with the time a client has to send its whole request (tests shorten it). */
    static AdminServer start(String host, int port, Secret token, Supplier<String> metrics, HealthMonitor health,
                             LiveValues values, Clock clock, String site, Duration readTimeout) throws IOException {
        // The JDK server's own limits (seconds; its request limit is a backstop behind ReadDeadlines, which is exact).
        System.setProperty("sun.net.httpserver.maxReqTime", System.getProperty("sun.net.httpserver.maxReqTime", "10"));
        System.setProperty("sun.net.httpserver.maxRspTime", System.getProperty("sun.net.httpserver.maxRspTime", "30"));
        System.setProperty("sun.net.httpserver.maxReqHeaders", System.getProperty("sun.net.httpserver.maxReqHeaders", "40"));
        HttpServer http = HttpServer.create(new InetSocketAddress(host, port), 16);
        AtomicInteger n = new AtomicInteger();
        java.util.concurrent.ThreadPoolExecutor pool = new java.util.concurrent.ThreadPoolExecutor(WORKERS, WORKERS, 30, TimeUnit.SECONDS,
                new java.util.concurrent.LinkedBlockingQueue<>(), r -> {
                    Thread t = new Thread(r, "admin-http-" + n.incrementAndGet());
                    t.setDaemon(true);
                    return t;
                });
        pool.allowCoreThreadTimeOut(true);
        ReadDeadlines deadlines = new ReadDeadlines(pool, readTimeout);
        AdminServer a = new AdminServer(http, pool, deadlines, token, metrics, health, values, clock, site);
        http.setExecutor(deadlines);
        http.createContext("/", a::handle);
        http.start();
        LOG.info("admin API on http://{}:{}/ (metrics, health, status{})", host, a.port(), token == null ? "; no token-file: /ack disabled" : ", ack");
        return a;
    }

    /** The bound port (useful when started on port 0 in tests). */
    public int port() {
        return server.getAddress().getPort();
    }

    /** Plugs in the open alerts for {@code /status}; null for none. */
    public void setAlertSource(AlertSource source) {
        this.alerts = source;
    }

    /**
     * Plugs in {@code POST /history/write}: writes what the history holds back in memory (the zone rows of the last
     * minutes wait for the rollups), so that a query sees everything up to now. At most once every
     * {@link #HISTORY_WRITE_EVERY}: each call writes pages, and the card should not be worn by a loop of calls.
     */
    public void setHistoryWrite(Runnable write) {
        this.historyWrite = write;
    }

    /** Plugs in acknowledgements for {@code POST /ack}; null answers 404. */
    public void setAckHandler(AckHandler handler) {
        this.ack = handler;
    }

    private void handle(HttpExchange ex) throws IOException {
        try (ex) {
            // The whole body first, for every request, while the read deadline runs: closing the exchange would
            // otherwise drain a body that never comes, with no deadline left to stop it.
            byte[] body = readLimited(ex.getRequestBody());
            if (body != null && !ReadDeadlines.requestRead()) return; // too slow: the connection is being closed
            String path = ex.getRequestURI().getPath();
            String method = ex.getRequestMethod();
            switch (path) {
                case "/metrics" -> {
                    if (requireGet(ex, method)) send(ex, 200, PROMETHEUS_TYPE, metrics.get());
                }
                case "/health" -> {
                    if (requireGet(ex, method)) {
                        Health h = health.check();
                        send(ex, h.healthy() ? 200 : 503, "application/json", h.toJson());
                    }
                }
                case "/status" -> {
                    if (requireGet(ex, method)) send(ex, 200, "application/json", statusJson());
                }
                case "/ack" -> ack(ex, method, body);
                case "/history/write" -> historyWrite(ex, method);
                default -> send(ex, 404, "application/json", error("no such endpoint; try /metrics, /health, /status, POST /ack or POST /history/write"));
            }
        } catch (RuntimeException e) {
            LOG.warn("admin API {} {} failed: {}", byre.alerts.AckBy.oneLine(ex.getRequestMethod(), 16), byre.alerts.AckBy.oneLine(ex.getRequestURI().getRawPath(), 200), e.toString());
            try {
                send(ex, 500, "application/json", error("internal error: " + e.getClass().getSimpleName()));
            } catch (IOException | RuntimeException ignored) {
                // the response may already have started
            }
        }
    }

    private static boolean requireGet(HttpExchange ex, String method) throws IOException {
        if (method.equals("GET") || method.equals("HEAD")) return true;
        ex.getResponseHeaders().set("Allow", "GET, HEAD");
        send(ex, 405, "application/json", error("use GET"));
        return false;
    }

    private void historyWrite(HttpExchange ex, String method) throws IOException {
        if (!method.equals("POST")) {
            ex.getResponseHeaders().set("Allow", "POST");
            send(ex, 405, "application/json", error("use POST"));
            return;
        }
        Runnable write = historyWrite;
        if (write == null) {
            send(ex, 404, "application/json", error("this byre keeps no history"));
            return;
        }
        Instant now = clock.instant();
        boolean due;
        synchronized (this) {
            due = lastHistoryWrite == null || !now.isBefore(lastHistoryWrite.plus(HISTORY_WRITE_EVERY)) || now.isBefore(lastHistoryWrite);
            if (due) lastHistoryWrite = now;
        }
        if (due) write.run();
        send(ex, 200, "application/json", new JsonWriter().field("written", due) + "\n");
    }

    private void ack(HttpExchange ex, String method, byte[] body) throws IOException {
        if (!method.equals("POST")) {
            ex.getResponseHeaders().set("Allow", "POST");
            send(ex, 405, "application/json", error("use POST"));
            return;
        }
        if (!authorised(ex.getRequestHeaders().getFirst("Authorization"))) {
            ex.getResponseHeaders().set("WWW-Authenticate", "Bearer");
            send(ex, 401, "application/json", error(token == null
                    ? "acknowledgement over HTTP is off: set admin.token-file"
                    : "missing or wrong bearer token (see admin.token-file)"));
            return;
        }
        if (body == null) {
            send(ex, 413, "application/json", error("request body over " + MAX_BODY_BYTES + " bytes"));
            return;
        }
        AckHandler h = ack;
        if (h == null) {
            send(ex, 404, "application/json", error("acknowledgements are not available in this version"));
            return;
        }
        String incident;
        String by;
        try {
            Object o = Json.parse(new String(body, StandardCharsets.UTF_8));
            if (!(o instanceof Map<?, ?> m) || !(m.get("incident") instanceof String i) || i.isBlank()) {
                send(ex, 400, "application/json", error("body must be {\"incident\":\"...\",\"by\":\"...\"}"));
                return;
            }
            if (i.length() > 200) {
                send(ex, 400, "application/json", error("incident is limited to 200 characters"));
                return;
            }
            incident = byre.alerts.AckBy.incident(i);
            // No control characters, at most 64 characters: the name goes into log lines and events.
            by = byre.alerts.AckBy.clean(m.get("by") instanceof String b ? b : null, "admin-api");
        } catch (Json.JsonException e) {
            send(ex, 400, "application/json", error("body is not JSON: " + e.getMessage()));
            return;
        }
        AckHandler.Result r = h.acknowledge(incident, by);
        int code = switch (r.outcome()) {
            case ACKNOWLEDGED, ALREADY_ACKNOWLEDGED -> 200;
            case UNKNOWN_INCIDENT -> 404;
            case FAILED -> 503;
        };
        LOG.info("acknowledgement of {} by {} over HTTP: {}", incident, by, r.outcome());
        send(ex, code, "application/json", new JsonWriter().field("outcome", r.outcome().name().toLowerCase().replace('_', '-'))
                .field("message", r.message()) + "\n");
    }

    /** {@code Authorization: Bearer <token>}; the scheme name is case-insensitive (RFC 7235 section 2.1). */
    static boolean authorised(byte[] token, String header) {
        if (token == null || token.length == 0 || header == null) return false;
        String h = header.strip();
        int sp = h.indexOf(' ');
        if (sp < 0 || !h.substring(0, sp).equalsIgnoreCase("Bearer")) return false;
        byte[] given = h.substring(sp + 1).strip().getBytes(StandardCharsets.UTF_8);
        return MessageDigest.isEqual(given, token);
    }

    private boolean authorised(String header) {
        return authorised(token, header);
    }

    /** The body, or null when it is longer than {@link #MAX_BODY_BYTES}. */
    private static byte[] readLimited(InputStream in) throws IOException {
        byte[] all = in.readNBytes(MAX_BODY_BYTES + 1);
        return all.length > MAX_BODY_BYTES ? null : all;
    }

    /** {@code {"site":…,"at":…,"zones":{zone:{quantity:{value,unit,at,age}}},"alerts":[…]|null}}; age in seconds. */
    String statusJson() {
        Instant now = clock.instant();
        JsonWriter w = new JsonWriter().field("site", site).field("at", now.toString()).beginObject("zones");
        String current = null;
        for (ZoneReading r : values.snapshot()) {
            if (!r.zone().equals(current)) {
                if (current != null) w.end();
                current = r.zone();
                w.beginObject(current);
            }
            w.beginObject(r.quantity().id()).field("value", r.value()).field("unit", r.quantity().canonicalUnit().symbol())
                    .field("at", r.at().toString()).field("age", Math.max(0, Duration.between(r.at(), now).toSeconds())).end();
        }
        if (current != null) w.end();
        w.end();
        AlertSource a = alerts;
        if (a == null) {
            w.field("alerts", (String) null);
        } else {
            w.beginArray("alerts");
            for (OpenAlert o : a.openAlerts()) alertJson(w.beginObject(), o).end();
            w.end();
        }
        return w + "\n";
    }

    static String alertJson(OpenAlert o) {
        return alertJson(new JsonWriter(), o).toString();
    }

    private static JsonWriter alertJson(JsonWriter w, OpenAlert o) {
        w.field("incident", o.incident()).field("watch", o.watch()).field("zone", o.zone())
                .field("level", o.level()).field("quantity", o.quantity()).field("value", o.value())
                .field("since", o.since() == null ? null : o.since().toString())
                .field("acknowledged-by", o.acknowledgedBy())
                .field("acknowledged-at", o.acknowledgedAt() == null ? null : o.acknowledgedAt().toString());
        // Only a central byre's alerts of a site can be known this way; a barn's /status stays as it was.
        return o.fromAlertState() ? w.field("from-alert-state", true) : w;
    }

    private static String error(String message) {
        return new JsonWriter().field("error", message) + "\n";
    }

    private static void send(HttpExchange ex, int code, String type, String body) throws IOException {
        HttpReply.send(ex, code, type, body);
    }

    @Override
    public void close() {
        server.stop(1);
        pool.shutdownNow();
        deadlines.close();
    }
}
