package byre.notify;

import byre.alerts.AlertEvent;
import byre.config.ChannelFields;
import byre.config.Secret;
import java.io.IOException;
import java.net.ConnectException;
import java.net.URI;
import java.net.URISyntaxException;
import java.net.UnknownHostException;
import java.net.http.HttpClient;
import java.net.http.HttpConnectTimeoutException;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.net.http.HttpTimeoutException;
import java.nio.channels.UnresolvedAddressException;
import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.util.List;
import java.util.Map;
import javax.net.ssl.SSLException;

/**
 * POSTs the event JSON (or a rendered template) to a URL. With a shared secret the body is signed:
 * {@code X-Byre-Signature: sha256=<hex HMAC-SHA256 of the body bytes>}. Any 2xx is success.
 */
public final class WebhookChannel implements Channel {
    public static final String SIGNATURE_HEADER = "X-Byre-Signature";

    /** {@code template}: the body with {placeholders}; {@code secret-file}: the HMAC key; {@code headers}: extra request headers. */
    public record Settings(URI url, String template, java.util.Map<String, String> headers, Secret secret, Duration timeout) {}

    public static final ChannelKind<Settings> KIND = ChannelKind.of("webhook",
            List.of("url", "secret-file", "headers", "template", "timeout"), List.of("url"), WebhookChannel::read,
            (name, s, ctx) -> new WebhookChannel(name, s.url(), s.template(), s.headers(), s.secret() == null ? null : s.secret().reveal(),
                    s.timeout()));

    static Settings read(ChannelFields f) {
        String name = f.channel();
        URI url = null;
        String u = f.string("url", null);
        if (u != null) {
            if (!u.startsWith("http://") && !u.startsWith("https://")) {
                f.problem("url", name + ".url must start with https:// or http://, not '" + u + "'");
            } else {
                try {
                    url = new URI(u);
                    if (url.getHost() == null) {
                        f.problem("url", name + ".url must be http(s)://host/..., not '" + u + "'");
                        url = null;
                    }
                } catch (URISyntaxException e) {
                    f.problem("url", name + ".url is not a valid URL: " + e.getMessage());
                }
            }
        }
        if (f.has("headers") && !f.isMapping("headers")) {
            f.problem("headers", name + ".headers must be a mapping such as { Authorization: \"Bearer …\" }");
        }
        String template = f.string("template", null);
        if (template != null) {
            for (String p : Template.unknown(template)) f.problem("template", name + ".template: " + p);
        }
        return new Settings(url, template, f.map("headers"), f.secretFile("secret-file"), f.duration("timeout", ChannelFactory.DEFAULT_TIMEOUT));
    }

    private final String name;
    private final URI url;
    private final String template;
    private final Map<String, String> headers;
    private final String secret;
    private final Duration timeout;
    /**
     * Made at the first delivery: building the JDK's client sets up TLS (reads the trust store) and starts a selector
     * thread, a tenth of a second of byre's start-up and a thread, for a channel that may not send for weeks.
     */
    private HttpClient client;

    public WebhookChannel(String name, URI url, String template, Map<String, String> headers, String secret, Duration timeout) {
        this.name = name;
        this.url = url;
        this.template = template;
        this.headers = Map.copyOf(headers);
        this.secret = secret;
        this.timeout = timeout;
    }

    private synchronized HttpClient client() {
        if (client == null) {
            // HTTP/1.1: the JDK's default (HTTP/2) asks a plain-http server to upgrade with "Upgrade: h2c", which some
            // proxies and small servers reject; one short POST gains nothing from HTTP/2.
            client = HttpClient.newBuilder().version(HttpClient.Version.HTTP_1_1).connectTimeout(timeout)
                    .followRedirects(HttpClient.Redirect.NEVER).build();
        }
        return client;
    }

    /** True once the HTTP client exists (after the first delivery). */
    synchronized boolean clientMade() {
        return client != null;
    }

    @Override
    public String name() {
        return name;
    }

    @Override
    public String type() {
        return "webhook";
    }

    /** The bytes that would be sent for an event. */
    public byte[] body(AlertEvent e) {
        return (template == null ? e.toJson() : Template.render(template, e)).getBytes(StandardCharsets.UTF_8);
    }

    @Override
    public DeliveryResult deliver(AlertEvent event) {
        byte[] body = body(event);
        HttpRequest.Builder rb = HttpRequest.newBuilder(url).timeout(timeout)
                .header("Content-Type", template == null || template.stripLeading().startsWith("{") ? "application/json" : "text/plain; charset=utf-8")
                .header("User-Agent", "byre")
                .header("X-Byre-Event", event.kind().id())
                .POST(HttpRequest.BodyPublishers.ofByteArray(body));
        if (event.id() != null) rb.header("X-Byre-Id", event.id());
        headers.forEach(rb::header);
        if (secret != null) rb.header(SIGNATURE_HEADER, "sha256=" + Hmac.sha256Hex(secret, body));
        try {
            HttpResponse<String> r = client().send(rb.build(), HttpResponse.BodyHandlers.ofString());
            if (r.statusCode() / 100 == 2) return DeliveryResult.success("HTTP " + r.statusCode());
            return DeliveryResult.failure(FailureReason.HTTP_STATUS,
                    "HTTP " + r.statusCode() + " from " + shown(url) + ": " + DeliveryResult.excerpt(r.body(), 200));
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            return DeliveryResult.failure(FailureReason.IO, "interrupted while posting to " + shown(url));
        } catch (IllegalArgumentException e) {
            return DeliveryResult.failure(FailureReason.CONFIG, "cannot post to " + shown(url) + ": " + e.getMessage());
        } catch (IOException e) {
            return classify(e, url);
        }
    }

    /**
     * The address as it may appear in logs and messages: push services often put their key in the path
     * or the query, so only the scheme, host, port and first path segment are shown.
     */
    static String shown(URI url) {
        String path = url.getRawPath() == null ? "" : url.getRawPath();
        int second = path.indexOf('/', 1);
        String head = second > 0 ? path.substring(0, second) + "/…" : path;
        return url.getScheme() + "://" + url.getHost() + (url.getPort() > 0 ? ":" + url.getPort() : "") + head
                + (url.getRawQuery() != null ? "?…" : "");
    }

    static DeliveryResult classify(IOException e, URI url) {
        String host = url.getHost() + (url.getPort() > 0 ? ":" + url.getPort() : "");
        if (e instanceof HttpConnectTimeoutException) {
            return DeliveryResult.failure(FailureReason.TIMEOUT, "connecting to " + host + " timed out");
        }
        if (e instanceof HttpTimeoutException) {
            return DeliveryResult.failure(FailureReason.TIMEOUT, "no answer from " + shown(url) + " in time");
        }
        for (Throwable t = e; t != null; t = t.getCause()) {
            if (t instanceof UnresolvedAddressException || t instanceof UnknownHostException) {
                return DeliveryResult.failure(FailureReason.DNS, "cannot resolve host '" + url.getHost() + "' (DNS)");
            }
            if (t instanceof SSLException) {
                return DeliveryResult.failure(FailureReason.TLS, "TLS with " + host + " failed: " + t.getMessage());
            }
        }
        if (e instanceof ConnectException) {
            return DeliveryResult.failure(FailureReason.REFUSED, "connection to " + host + " refused or unreachable"
                    + (e.getMessage() == null ? "" : " (" + e.getMessage() + ")"));
        }
        return DeliveryResult.failure(FailureReason.IO, "posting to " + shown(url) + " failed: " + e.getClass().getSimpleName()
                + (e.getMessage() == null ? "" : ": " + e.getMessage()));
    }
}
