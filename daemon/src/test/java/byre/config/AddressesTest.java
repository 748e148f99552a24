package byre.config;

import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import org.junit.jupiter.api.Test;

/** The embedded broker's address check, shared by the configuration and the broker itself. */
class AddressesTest {
    @Test
    void loopbackLiteralsAndLocalhostAreLoopbackAndNothingElseIs() {
        for (String host : List.of("127.0.0.1", "127.0.1.1", "::1", "[::1]", "localhost", " LOCALHOST ")) {
            assertTrue(Addresses.isLoopback(host), host);
        }
        for (String host : List.of("0.0.0.0", "192.168.1.20", "::", "barn-pi.local", "", "10.0.0.1", "[::]", "127.0.0.1.nip")) {
            assertFalse(Addresses.isLoopback(host), host);
        }
        assertFalse(Addresses.isLoopback(null));
    }
}
