package byre.config;

import java.time.Duration;
import java.util.Map;
import java.util.Set;
import org.snakeyaml.engine.v2.nodes.Node;

/** Reads and checks {@code page:}: the barn page's listener, the address phones use, its signed links and its login. */
final class PageSection {
    static final Set<String> KEYS = NodeReader.ordered("listen", "base-url", "link-key-file", "link-valid", "reading");

    private PageSection() {}

    static PageSettings read(NodeReader r, Node node) {
        Map<String, Node> m = node == null ? Map.of() : r.mapping(node, KEYS, "page");
        String listen = r.string(m.get("listen"), "page.listen", "127.0.0.1:0");
        NodeReader.HostPort hp = r.hostPort(m.get("listen"), "page.listen", listen);
        String baseUrl = r.string(m.get("base-url"), "page.base-url", null);
        if (baseUrl != null) {
            baseUrl = baseUrl.strip();
            while (baseUrl.endsWith("/")) baseUrl = baseUrl.substring(0, baseUrl.length() - 1);
            if (!baseUrl.matches("https?://[^\\s/?#]+(/[^\\s?#]*)?")) {
                r.problem(m.get("base-url"), "page.base-url must be the address a phone uses to reach the page, such as "
                        + "http://192.168.1.20:9467, not '" + baseUrl + "'");
                baseUrl = null;
            }
        }
        String keyFile = r.string(m.get("link-key-file"), "page.link-key-file", null);
        Duration valid = r.duration(m.get("link-valid"), "page.link-valid", PageSettings.DEFAULT_LINK_VALID);
        String reading = r.string(m.get("reading"), "page.reading", "open");
        if (!reading.equals("open") && !reading.equals("token")) {
            r.problem(m.get("reading"), "page.reading must be 'open' (no login on the listener's network) or 'token' "
                    + "(the admin token as password), not '" + reading + "'");
        }
        if (baseUrl != null && hp.port() == 0) {
            r.problem(m.get("base-url"), "page.base-url is set but page.listen is not: links would lead nowhere");
        }
        return new PageSettings(hp.host(), hp.port(), baseUrl, keyFile == null ? null : r.resolve(keyFile), valid,
                reading.equals("token"));
    }
}
