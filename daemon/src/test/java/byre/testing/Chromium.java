package byre.testing;

import byre.json.Json;
import byre.json.JsonWriter;
import java.io.IOException;
import java.net.ServerSocket;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Base64;
import java.util.List;
import java.util.Map;

/**
 * Debian's headless Chromium driven through chromedriver's W3C WebDriver HTTP API (https://www.w3.org/TR/webdriver2/)
 * with the JDK's HttpClient and byre's own JSON reader. Why not Selenium: the dozen calls a page test needs are a
 * short class, and Selenium would bring some twenty jars plus a manager that tries to download browsers, which no
 * machine here may do. The page is shown at a phone's size through Chromium's mobile emulation.
 *
 * <p>Everything the browser writes (profile, shared-memory files, crash dumps) goes under a folder the caller owns
 * and deletes; {@link #close()} ends the session, then the driver and whatever it started.
 */
public final class Chromium implements AutoCloseable {
    public static final Path BROWSER = Path.of("/usr/bin/chromium");
    public static final Path DRIVER = Path.of("/usr/bin/chromedriver");
    private static final String ELEMENT = "element-6066-11e4-a52e-4f735466cecf";
    private static final Duration CALL_TIMEOUT = Duration.ofSeconds(20);

    private final Process driver;
    private final HttpClient http = HttpClient.newBuilder().connectTimeout(Duration.ofSeconds(5)).build();
    private final String base;
    private String session;

    /** Whether both Debian binaries are there ({@code apt-get install chromium chromium-driver}). */
    public static boolean installed() {
        return Files.isExecutable(BROWSER) && Files.isExecutable(DRIVER);
    }

    /**
     * Starts chromedriver on a free loopback port and a headless browser with a phone-sized viewport.
     *
     * @param scratch a fresh folder for the browser's profile and temporary files (the caller deletes it)
     */
    public static Chromium start(Path scratch, int widthPx, int heightPx) throws IOException, InterruptedException {
        int port;
        try (ServerSocket s = new ServerSocket(0, 1, java.net.InetAddress.getLoopbackAddress())) {
            port = s.getLocalPort();
        }
        Path profile = Files.createDirectories(scratch.resolve("profile"));
        Path tmp = Files.createDirectories(scratch.resolve("tmp"));
        ProcessBuilder pb = new ProcessBuilder(DRIVER.toString(), "--port=" + port, "--allowed-ips=127.0.0.1")
                .redirectErrorStream(true).redirectOutput(ProcessBuilder.Redirect.DISCARD);
        pb.environment().put("TMPDIR", tmp.toString()); // the browser's temporary files stay in the scratch folder
        pb.environment().put("HOME", scratch.toString());
        Process p = pb.start();
        Chromium c = new Chromium(p, "http://127.0.0.1:" + port);
        try {
            c.waitReady();
            c.newSession(profile, widthPx, heightPx);
        } catch (IOException | RuntimeException | InterruptedException e) {
            c.close();
            throw e;
        }
        return c;
    }

    private Chromium(Process driver, String base) {
        this.driver = driver;
        this.base = base;
    }

    private void waitReady() throws IOException, InterruptedException {
        long deadline = System.nanoTime() + 10_000_000_000L;
        while (System.nanoTime() < deadline) {
            if (!driver.isAlive()) throw new IOException("chromedriver exited with " + driver.exitValue());
            try {
                Object v = call("GET", "/status", null);
                if (v instanceof Map<?, ?> m && Boolean.TRUE.equals(m.get("ready"))) return;
            } catch (IOException notYet) {
                // not listening yet
            }
            Thread.sleep(50);
        }
        throw new IOException("chromedriver did not become ready within 10 s");
    }

    private void newSession(Path profile, int width, int height) throws IOException, InterruptedException {
        List<String> args = List.of("--headless", "--no-sandbox", "--disable-gpu", "--disable-dev-shm-usage", "--no-first-run",
                "--disable-background-networking", "--disable-component-update", "--disable-sync", "--disable-breakpad",
                "--disable-extensions", "--user-data-dir=" + profile);
        StringBuilder argJson = new StringBuilder("[");
        for (String a : args) {
            if (argJson.length() > 1) argJson.append(',');
            JsonWriter.quote(argJson, a);
        }
        argJson.append(']');
        String metrics = new JsonWriter().field("width", width).field("height", height).field("pixelRatio", 2).toString();
        String chrome = new JsonWriter().field("binary", BROWSER.toString()).raw("args", argJson.toString())
                .raw("mobileEmulation", new JsonWriter().raw("deviceMetrics", metrics).toString()).toString();
        String caps = new JsonWriter().raw("capabilities", new JsonWriter().raw("alwaysMatch",
                new JsonWriter().field("browserName", "chrome").raw("goog:chromeOptions", chrome).toString()).toString()).toString();
        Object v = call("POST", "/session", caps);
        if (!(v instanceof Map<?, ?> m) || !(m.get("sessionId") instanceof String id)) throw new IOException("no session: " + v);
        session = id;
    }

    /** Opens a page and waits until it has loaded. */
    public void open(String url) throws IOException, InterruptedException {
        call("POST", s("/url"), new JsonWriter().field("url", url).toString());
    }

    public String currentUrl() throws IOException, InterruptedException {
        return (String) call("GET", s("/url"), null);
    }

    public String source() throws IOException, InterruptedException {
        return (String) call("GET", s("/source"), null);
    }

    /** The ids of the elements matching a CSS selector, in document order. */
    public List<String> all(String css) throws IOException, InterruptedException {
        Object v = call("POST", s("/elements"), new JsonWriter().field("using", "css selector").field("value", css).toString());
        List<String> out = new ArrayList<>();
        if (v instanceof List<?> l) for (Object o : l) out.add((String) ((Map<?, ?>) o).get(ELEMENT));
        return out;
    }

    /** The one element matching a CSS selector; fails when there is none. */
    public String one(String css) throws IOException, InterruptedException {
        // A click that submits a form can return before the next page is there (seen on a loaded machine): look
        // again for a while before deciding the element is missing.
        long deadline = System.nanoTime() + 10_000_000_000L;
        List<String> found = all(css);
        while (found.isEmpty() && System.nanoTime() < deadline) {
            Thread.sleep(50);
            found = all(css);
        }
        if (found.isEmpty()) throw new AssertionError("no element matches " + css);
        return found.get(0);
    }

    /** The text of an element as the user sees it (rendered, whitespace collapsed). */
    public String text(String element) throws IOException, InterruptedException {
        return (String) call("GET", s("/element/" + element + "/text"), null);
    }

    public String text(String element, String css) throws IOException, InterruptedException {
        Object v = call("POST", s("/element/" + element + "/element"), new JsonWriter().field("using", "css selector").field("value", css).toString());
        return text((String) ((Map<?, ?>) v).get(ELEMENT));
    }

    public String attribute(String element, String name) throws IOException, InterruptedException {
        Object v = call("GET", s("/element/" + element + "/attribute/" + name), null);
        return v == null ? null : v.toString();
    }

    /** A DOM property such as {@code offsetTop} or {@code scrollWidth}, as text. */
    public String property(String element, String name) throws IOException, InterruptedException {
        Object v = call("GET", s("/element/" + element + "/property/" + name), null);
        if (v instanceof Double d && d == Math.rint(d)) return Long.toString(d.longValue());
        return v == null ? null : v.toString();
    }

    /** Where an element is drawn, in CSS pixels: {x, y, width, height}. */
    public double[] rect(String element) throws IOException, InterruptedException {
        Map<?, ?> r = (Map<?, ?>) call("GET", s("/element/" + element + "/rect"), null);
        return new double[] {((Number) r.get("x")).doubleValue(), ((Number) r.get("y")).doubleValue(),
                ((Number) r.get("width")).doubleValue(), ((Number) r.get("height")).doubleValue()};
    }

    /** A computed CSS value, e.g. {@code background-color} as {@code rgba(0, 0, 0, 1)}. */
    public String css(String element, String property) throws IOException, InterruptedException {
        return (String) call("GET", s("/element/" + element + "/css/" + property), null);
    }

    public void click(String element) throws IOException, InterruptedException {
        call("POST", s("/element/" + element + "/click"), "{}");
    }

    public void type(String element, String text) throws IOException, InterruptedException {
        call("POST", s("/element/" + element + "/value"), new JsonWriter().field("text", text).toString());
    }

    /** What the phone's screen shows (the viewport only), as a PNG. */
    public void screenshotScreen(Path png) throws IOException, InterruptedException {
        Files.createDirectories(png.toAbsolutePath().getParent());
        Files.write(png, Base64.getDecoder().decode((String) call("GET", s("/screenshot"), null)));
    }

    /** The whole page (also below the fold) as a PNG, through the DevTools command chromedriver passes on. */
    public void screenshot(Path png) throws IOException, InterruptedException {
        Object metrics = call("POST", s("/goog/cdp/execute"), "{\"cmd\":\"Page.getLayoutMetrics\",\"params\":{}}");
        Map<?, ?> size = (Map<?, ?>) ((Map<?, ?>) metrics).get("cssContentSize");
        double w = ((Number) size.get("width")).doubleValue();
        double h = ((Number) size.get("height")).doubleValue();
        String clip = new JsonWriter().field("x", 0).field("y", 0).field("width", w).field("height", h).field("scale", 1).toString();
        Object shot = call("POST", s("/goog/cdp/execute"), "{\"cmd\":\"Page.captureScreenshot\",\"params\":{\"format\":\"png\","
                + "\"captureBeyondViewport\":true,\"clip\":" + clip + "}}");
        Files.createDirectories(png.toAbsolutePath().getParent());
        Files.write(png, Base64.getDecoder().decode((String) ((Map<?, ?>) shot).get("data")));
    }

    private String s(String path) {
        return "/session/" + session + path;
    }

    /** One WebDriver command; returns its {@code value}, or throws with the driver's error message. */
    private Object call(String method, String path, String body) throws IOException, InterruptedException {
        HttpRequest.Builder b = HttpRequest.newBuilder(URI.create(base + path)).timeout(CALL_TIMEOUT)
                .header("Content-Type", "application/json; charset=utf-8");
        b = switch (method) {
            case "GET" -> b.GET();
            case "DELETE" -> b.DELETE();
            default -> b.POST(HttpRequest.BodyPublishers.ofString(body == null ? "{}" : body));
        };
        HttpResponse<String> r = http.send(b.build(), HttpResponse.BodyHandlers.ofString());
        Object parsed = Json.parse(r.body());
        Object value = parsed instanceof Map<?, ?> m ? m.get("value") : null;
        if (r.statusCode() != 200) {
            String err = value instanceof Map<?, ?> e ? e.get("error") + ": " + e.get("message") : r.body();
            throw new IOException("WebDriver " + method + " " + path.replace(session == null ? "\0" : session, "…") + " failed (" + r.statusCode() + "): " + err);
        }
        return value;
    }

    @Override
    public void close() {
        try {
            if (session != null) call("DELETE", s(""), null);
        } catch (IOException | RuntimeException e) {
            // the driver is stopped below anyway
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
        List<ProcessHandle> children = driver.descendants().toList();
        driver.destroy();
        try {
            if (!driver.waitFor(5, java.util.concurrent.TimeUnit.SECONDS)) driver.destroyForcibly();
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            driver.destroyForcibly();
        }
        for (ProcessHandle c : children) {
            if (c.isAlive()) c.destroyForcibly();
        }
    }
}
