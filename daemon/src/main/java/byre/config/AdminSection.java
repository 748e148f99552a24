package byre.config;

import java.io.IOException;
import java.nio.file.Path;
import java.util.Map;
import java.util.Set;
import org.snakeyaml.engine.v2.nodes.Node;

/**
 * Reads {@code admin:}: the listener and the token. A token file that cannot be read is not a problem of the
 * configuration: it goes into {@link AdminSettings#tokenProblem()}, and only acknowledgement through the API is off.
 */
final class AdminSection {
    static final Set<String> KEYS = NodeReader.ordered("listen", "token-file");

    private AdminSection() {}

    static AdminSettings read(NodeReader r, Node node) {
        Map<String, Node> m = node == null ? Map.of() : r.mapping(node, KEYS, "admin");
        String listen = r.string(m.get("listen"), "admin.listen", "127.0.0.1:9466");
        NodeReader.HostPort hp = r.hostPort(m.get("listen"), "admin.listen", listen);
        String tokenFile = r.string(m.get("token-file"), "admin.token-file", null);
        Secret token = null;
        String tokenProblem = null;
        if (tokenFile != null) {
            Path p = r.resolve(tokenFile);
            try {
                String v = SmallFile.secret(p);
                if (v.isEmpty()) {
                    tokenProblem = "admin.token-file " + p + " is empty";
                } else {
                    token = new Secret(v, p.toString());
                }
            } catch (SmallFile.Refused e) {
                tokenProblem = "admin.token-file: " + e.getMessage();
            } catch (IOException e) {
                tokenProblem = "admin.token-file: cannot read " + p + " (" + SmallFile.describe(e) + ")";
            }
        }
        return new AdminSettings(hp.host(), hp.port(), token, tokenProblem);
    }
}
