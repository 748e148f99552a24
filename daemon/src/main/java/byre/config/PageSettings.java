package byre.config;

import java.nio.file.Path;
import java.time.Duration;

/**
 * The barn page: its own HTTP listener (port 0: off), so it can face the farm network while the admin API stays on
 * loopback. {@code baseUrl} (or null) is the address a phone uses to reach it; acknowledgement links in messages
 * start with it and are signed with the key in {@code linkKeyFile} (null: {@code link.key} beside the history
 * database), valid for {@code linkValid}. With
 * {@code readingNeedsToken} the page itself asks for the admin token too (HTTP basic login).
 */
public record PageSettings(String host, int port, String baseUrl, Path linkKeyFile, Duration linkValid, boolean readingNeedsToken) {
    public static final Duration DEFAULT_LINK_VALID = Duration.ofHours(12);

    public boolean enabled() {
        return port > 0;
    }

    /** The key file: the configured one, or {@code link.key} in the history database's folder. */
    public Path keyFile(HistorySettings history) {
        if (linkKeyFile != null) return linkKeyFile;
        Path dir = history.path().toAbsolutePath().getParent();
        return dir == null ? Path.of("link.key") : dir.resolve("link.key");
    }

    /** Acknowledgement links go into messages only when the phone's address of the page is known. */
    public boolean linksEnabled() {
        return enabled() && baseUrl != null;
    }
}
