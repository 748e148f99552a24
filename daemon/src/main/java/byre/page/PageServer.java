package byre.page;

import byre.alerts.AckResult;
import byre.alerts.AckService;
import byre.alerts.IncidentBook;
import byre.alerts.OpenIncident;
import byre.config.Secret;
import com.sun.net.httpserver.HttpExchange;
import com.sun.net.httpserver.HttpServer;
import io.micrometer.core.instrument.Counter;
import io.micrometer.core.instrument.MeterRegistry;
import java.io.IOException;
import java.net.InetSocketAddress;
import java.net.URLDecoder;
import java.nio.charset.StandardCharsets;
import java.security.MessageDigest;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.Base64;
import java.util.HashMap;
import java.util.Map;
import java.util.Optional;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.atomic.AtomicInteger;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The barn page's own HTTP listener (the JDK's server), apart from the admin API so that it can face the farm
 * network while {@code /metrics} and the token API stay on loopback:
 * <ul>
 * <li>{@code GET /}: the barn page (open on the listener's network, or behind the admin token as a basic-login
 *     password when {@code page.reading: token}); on a central byre the list of sites;</li>
 * <li>{@code GET /site/<site>}: on a central byre, one site's page (read as {@code /} is);</li>
 * <li>{@code GET /a/<incident>/<expiry>/<signature>}: a signed link's page, the alert and one button; a GET never
 *     acknowledges (phones fetch links for previews). {@code POST} to the same address acknowledges, once;</li>
 * <li>{@code GET /ack/<incident>}, {@code POST /ack/<incident>}: acknowledging from the page with the admin token.</li>
 * </ul>
 * Responses are never cached, never send a referrer (a link's address is its authority) and allow no script.
 * Neither the token, the link key nor a link's signature is ever logged.
 */
public final class PageServer implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(PageServer.class);
    static final int MAX_BODY_BYTES = 2048;
    static final String HTML = "text/html; charset=utf-8";
    /** Nothing but the inline style sheet, inline SVG and forms posting back here. */
    static final String CSP = "default-src 'none'; style-src '" + BarnPageHtml.CSS_HASH + "'; img-src data:; form-action 'self'; "
            + "base-uri 'none'; frame-ancestors 'none'";
    /** Who a signed link's acknowledgement is recorded as. */
    static final String LINK_ACK_BY = "signed link";

    private final HttpServer server;
    private final ExecutorService pool;
    private final BarnPageHtml.Site site;
    private final PageContent content;
    private final AckService acks;
    private final AckLinkSigner signer;
    private final byte[] token;
    private final boolean readingNeedsToken;
    private final Clock clock;
    private final MeterRegistry registry;

    private PageServer(HttpServer server, ExecutorService pool, BarnPageHtml.Site site, PageContent content,
                       AckService acks, AckLinkSigner signer, Secret token,
                       boolean readingNeedsToken, Clock clock, MeterRegistry registry) {
        this.server = server;
        this.pool = pool;
        this.site = site;
        this.content = content;
        this.acks = acks;
        this.signer = signer;
        this.token = token == null ? null : token.reveal().strip().getBytes(StandardCharsets.UTF_8);
        this.readingNeedsToken = readingNeedsToken;
        this.clock = clock;
        this.registry = registry;
    }

    /**
     * Binds and starts the listener.
     *
     * @param content  a barn's page, or a central byre's list of sites and their pages
     * @param acks     acknowledges an incident of {@link PageContent#open()} (a central byre sends a site's on to it)
     * @param signer checks signed links; null when there is no link key (links then get the "not valid" page)
     * @param token    the admin token, or null (acknowledging from the page is then off; signed links still work)
     * @param registry counts acknowledgement attempts by outcome ({@code byre.page.acks})
     * @throws IOException when the address cannot be bound
     */
    static PageServer start(String host, int port, BarnPageHtml.Site site, PageContent content, AckService acks, AckLinkSigner signer, Secret token, boolean readingNeedsToken, Clock clock,
                            MeterRegistry registry) throws IOException {
        // Bound the time a slow or idle client may hold a worker (JDK server properties, seconds; the admin API sets the same).
        System.setProperty("sun.net.httpserver.maxReqTime", System.getProperty("sun.net.httpserver.maxReqTime", "10"));
        System.setProperty("sun.net.httpserver.maxRspTime", System.getProperty("sun.net.httpserver.maxRspTime", "30"));
        System.setProperty("sun.net.httpserver.maxReqHeaders", System.getProperty("sun.net.httpserver.maxReqHeaders", "40"));
        HttpServer http = HttpServer.create(new InetSocketAddress(host, port), 16);
        AtomicInteger n = new AtomicInteger();
        ExecutorService pool = Executors.newFixedThreadPool(2, r -> {
            Thread t = new Thread(r, "page-http-" + n.incrementAndGet());
            t.setDaemon(true);
            return t;
        });
        PageServer p = new PageServer(http, pool, site, content, acks, signer, token, readingNeedsToken, clock, registry);
        http.setExecutor(pool);
        http.createContext("/", p::handle);
        http.start();
        LOG.info("barn page on http://{}:{}/ (reading {}; acknowledging with {})", host, p.port(),
                readingNeedsToken ? "needs the admin token" : "open to the listener's network",
                signer == null ? (token == null ? "nothing: no token, no link key" : "the admin token")
                        : (token == null ? "signed links" : "signed links or the admin token"));
        return p;
    }

    public int port() {
        return server.getAddress().getPort();
    }

    private void handle(HttpExchange ex) throws IOException {
        try (ex) {
            String path = ex.getRequestURI().getRawPath();
            String method = ex.getRequestMethod();
            Instant now = clock.instant();
            if (path.equals("/")) {
                if (!readable(ex, method, now)) return;
                send(ex, 200, content.front(now));
            } else if (path.startsWith("/site/")) {
                if (!readable(ex, method, now)) return;
                Optional<String> page = content.site(path.substring("/site/".length()), now);
                if (page.isPresent()) {
                    send(ex, 200, page.get());
                } else {
                    send(ex, 404, BarnPageHtml.outcome(site, now, "No such site", "No site of that name is known here."));
                }
            } else if (path.startsWith("/a/")) {
                link(ex, method, path, now);
            } else if (path.startsWith("/ack/")) {
                tokenAck(ex, method, path.substring("/ack/".length()), now);
            } else {
                send(ex, 404, BarnPageHtml.outcome(site, now, "Not found", "There is nothing at this address."));
            }
        } catch (RuntimeException e) {
            LOG.warn("barn page {} failed: {}", ex.getRequestMethod(), e.toString());
            try {
                send(ex, 500, BarnPageHtml.outcome(site, clock.instant(), "Something went wrong", "byre could not draw this page ("
                        + e.getClass().getSimpleName() + "); the log says more."));
            } catch (IOException | RuntimeException ignored) {
                // the response may already have started
            }
        }
    }

    /** A GET or HEAD, by someone allowed to read (anyone, or with {@code page.reading: token} the token's holder). */
    private boolean readable(HttpExchange ex, String method, Instant now) throws IOException {
        if (!allowed(ex, method, "GET", "HEAD")) return false;
        if (readingNeedsToken && !basicLogin(ex)) {
            ex.getResponseHeaders().set("WWW-Authenticate", "Basic realm=\"byre barn page\", charset=\"UTF-8\"");
            send(ex, 401, BarnPageHtml.outcome(site, now, "Login needed", "This barn page asks for the admin token as the password (any user name)."));
            return false;
        }
        return true;
    }

    // ---- signed links ----

    private void link(HttpExchange ex, String method, String path, Instant now) throws IOException {
        if (!allowed(ex, method, "GET", "HEAD", "POST")) return;
        String[] parts = path.substring("/a/".length()).split("/", -1);
        if (parts.length != 3 || signer == null) {
            count("link", "forged");
            refuse(ex, 403, now, AckLinkSigner.Verdict.FORGED, null);
            return;
        }
        String incident = parts[0];
        boolean post = method.equals("POST");
        if (post) drain(ex);
        AckLinkSigner.Verdict v = post ? signer.redeem(incident, parts[1], parts[2], now) : signer.check(incident, parts[1], parts[2], now);
        if (v != AckLinkSigner.Verdict.VALID) {
            count("link", v.name().toLowerCase());
            LOG.info("acknowledgement link for incident {} refused: {}", v == AckLinkSigner.Verdict.FORGED ? "(not shown)" : incident,
                    v.name().toLowerCase());
            refuse(ex, switch (v) {
                case FORGED -> 403;
                case EXPIRED -> 410;
                case USED -> 409;
                case VALID -> 200;
            }, now, v, parts[1]);
            return;
        }
        if (!post) {
            Optional<OpenIncident> a = find(incident);
            if (a.isEmpty()) {
                send(ex, 404, BarnPageHtml.outcome(site, now, "Nothing to acknowledge", "This alert is no longer open: it has cleared. "
                        + "Nothing was changed."));
            } else if (a.get().ackBy() != null) {
                send(ex, 200, BarnPageHtml.outcome(site, now, "Already acknowledged", "Acknowledged by " + a.get().ackBy()
                        + (a.get().ackAt() == null ? "" : ", " + IncidentBook.human(Duration.between(a.get().ackAt(), now)) + " ago")
                        + ". Nothing was changed."));
            } else {
                send(ex, 200, BarnPageHtml.linkConfirm(site, a.get(), path, now));
            }
            return;
        }
        Optional<OpenIncident> before = find(incident);
        AckResult r = acks.acknowledge(incident, LINK_ACK_BY);
        count("link", r.status().name().toLowerCase());
        LOG.info("acknowledgement of {} by signed link: {}", incident, r.status().name().toLowerCase());
        answer(ex, r, before, now);
    }

    private void refuse(HttpExchange ex, int code, Instant now, AckLinkSigner.Verdict v, String expiry) throws IOException {
        String[] said = switch (v) {
            case EXPIRED -> new String[] {"This link has expired", "It worked until "
                    + BarnPageHtml.when(Instant.ofEpochSecond(Long.parseLong(expiry)), site.timezone())
                    + " farm time. Nothing was changed. Use the link in the newest message, or acknowledge on the barn page."};
            case USED -> new String[] {"This link has been used", "It acknowledged its alert already; a link works once. Nothing was changed."};
            case FORGED, VALID -> new String[] {"This link is not valid", "It was not made by this byre, or it was changed or cut short "
                    + "on the way (copy the whole link). Nothing was changed."};
        };
        send(ex, code, BarnPageHtml.outcome(site, now, said[0], said[1]));
    }

    // ---- acknowledging with the admin token ----

    private void tokenAck(HttpExchange ex, String method, String incident, Instant now) throws IOException {
        if (!allowed(ex, method, "GET", "HEAD", "POST")) return;
        if (!AckLinkSigner.INCIDENT.matcher(incident).matches()) {
            send(ex, 404, BarnPageHtml.outcome(site, now, "Nothing to acknowledge", "No open alert has that incident id."));
            return;
        }
        if (token == null) {
            send(ex, 403, BarnPageHtml.outcome(site, now, "Acknowledging here is off",
                    "byre has no admin token (admin.token-file), so the page cannot check who acknowledges. Use the link in the message."));
            return;
        }
        boolean loggedIn = basicLogin(ex);
        Optional<OpenIncident> a = find(incident);
        if (!method.equals("POST")) {
            if (a.isEmpty()) {
                send(ex, 404, BarnPageHtml.outcome(site, now, "Nothing to acknowledge", "This alert is no longer open: it has cleared."));
            } else if (a.get().ackBy() != null) {
                send(ex, 200, BarnPageHtml.outcome(site, now, "Already acknowledged", "Acknowledged by " + a.get().ackBy() + "."));
            } else {
                send(ex, 200, BarnPageHtml.tokenForm(site, a.get(), now, loggedIn));
            }
            return;
        }
        Map<String, String> form = form(ex);
        if (form == null) {
            send(ex, 413, BarnPageHtml.outcome(site, now, "Too much", "The form was larger than " + MAX_BODY_BYTES + " bytes. Nothing was changed."));
            return;
        }
        String given = form.getOrDefault("token", "").strip();
        if (!loggedIn && !tokenMatches(given.getBytes(StandardCharsets.UTF_8))) {
            count("token", "wrong-token");
            LOG.info("acknowledgement of {} from the barn page refused: wrong admin token", incident);
            send(ex, 403, BarnPageHtml.outcome(site, now, "Wrong token", "That is not the admin token. Nothing was changed."));
            return;
        }
        String by = form.getOrDefault("by", "").strip();
        if (by.isEmpty()) by = content.unnamed();
        if (by.length() > 80) by = by.substring(0, 80);
        AckResult r = acks.acknowledge(incident, by);
        count("token", r.status().name().toLowerCase());
        LOG.info("acknowledgement of {} from the barn page: {}", incident, r.status().name().toLowerCase());
        answer(ex, r, a, now);
    }

    private void answer(HttpExchange ex, AckResult r, Optional<OpenIncident> before, Instant now) throws IOException {
        String what = before.map(i -> i.watch() + (i.zone() == null || i.zone().isEmpty() ? "" : " in " + i.zone())
                + ", open " + IncidentBook.human(Duration.between(i.since() == null ? i.raisedAt() : i.since(), now))).orElse(r.incident());
        switch (r.status()) {
            case ACKNOWLEDGED -> send(ex, 200, BarnPageHtml.outcome(site, now, "Acknowledged", "Acknowledged: " + what
                    + ". " + content.afterAck(r.incident())));
            case ALREADY -> send(ex, 200, BarnPageHtml.outcome(site, now, "Already acknowledged", what + ": " + r.detail() + ". Nothing was changed."));
            case UNKNOWN -> send(ex, 404, BarnPageHtml.outcome(site, now, "Nothing to acknowledge",
                    "This alert is no longer open: it has cleared. Nothing was changed."));
            case INVALID -> send(ex, 400, BarnPageHtml.outcome(site, now, "Not acknowledged", r.detail()));
        }
    }

    // ---- helpers ----

    /**
     * {@code byre_page_acks_total{via="link"|"token", outcome=…}}: for links the refusals (forged, expired, used) and
     * what a press did (acknowledged, already, unknown); for the token form the same, and wrong-token.
     */
    private void count(String via, String outcome) {
        Counter.builder("byre.page.acks").tag("via", via).tag("outcome", outcome)
                .description("Acknowledgements tried on the barn page, by way and outcome").register(registry).increment();
    }

    private Optional<OpenIncident> find(String incident) {
        return content.open().stream().filter(i -> i.id().equals(incident)).findFirst();
    }

    private boolean tokenMatches(byte[] given) {
        return token != null && token.length > 0 && MessageDigest.isEqual(given, token); // constant time
    }

    /** HTTP basic login whose password is the admin token (the user name is not checked). */
    private boolean basicLogin(HttpExchange ex) {
        String h = ex.getRequestHeaders().getFirst("Authorization");
        if (h == null || h.length() < 6 || !h.regionMatches(true, 0, "Basic ", 0, 6)) return false;
        try {
            String pair = new String(Base64.getDecoder().decode(h.substring(6).strip()), StandardCharsets.UTF_8);
            int colon = pair.indexOf(':');
            return colon >= 0 && tokenMatches(pair.substring(colon + 1).strip().getBytes(StandardCharsets.UTF_8));
        } catch (IllegalArgumentException e) {
            return false;
        }
    }

    private boolean allowed(HttpExchange ex, String method, String... methods) throws IOException {
        for (String m : methods) if (m.equals(method)) return true;
        ex.getResponseHeaders().set("Allow", String.join(", ", methods));
        send(ex, 405, BarnPageHtml.outcome(site, clock.instant(), "Not allowed", "This address does not take " + method + "."));
        return false;
    }

    /** The url-encoded form fields, or null when the body is too large. */
    private static Map<String, String> form(HttpExchange ex) throws IOException {
        byte[] body = ex.getRequestBody().readNBytes(MAX_BODY_BYTES + 1);
        if (body.length > MAX_BODY_BYTES) return null;
        Map<String, String> out = new HashMap<>();
        for (String pair : new String(body, StandardCharsets.UTF_8).split("&")) {
            if (pair.isEmpty()) continue;
            int eq = pair.indexOf('=');
            try {
                String k = URLDecoder.decode(eq < 0 ? pair : pair.substring(0, eq), StandardCharsets.UTF_8);
                String v = eq < 0 ? "" : URLDecoder.decode(pair.substring(eq + 1), StandardCharsets.UTF_8);
                out.putIfAbsent(k, v);
            } catch (IllegalArgumentException e) {
                // a malformed field is left out
            }
        }
        return out;
    }

    private static void drain(HttpExchange ex) throws IOException {
        ex.getRequestBody().readNBytes(MAX_BODY_BYTES);
    }

    private static void send(HttpExchange ex, int code, String html) throws IOException {
        var h = ex.getResponseHeaders();
        h.set("Content-Security-Policy", CSP);
        h.set("Referrer-Policy", "no-referrer");
        h.set("X-Content-Type-Options", "nosniff");
        h.set("X-Frame-Options", "DENY");
        h.set("X-Robots-Tag", "noindex");
        byre.admin.HttpReply.send(ex, code, HTML, html);
    }

    @Override
    public void close() {
        server.stop(0);
        pool.shutdownNow();
    }
}
