package byre.config;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.testing.Configs;
import java.nio.file.Path;
import java.time.Duration;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The {@code page:} section: the barn page's listener, the phone's address of it, and its acknowledgement links. */
class PageConfigTest {
    @TempDir
    Path dir;

    static final String BASE = """
            site: larkmoor
            sensors:
              shed-dry: { topic: larkmoor/cow-shed/dry, quantity: dry-bulb, unit: C }
            zones:
              cow-shed: { sensors: [shed-dry] }
            history:
              path: /var/lib/byre/history.db
            """;

    ByreConfig parse(String page) throws ConfigException {
        return Configs.parse("byre.yaml", BASE + page, dir, name -> null);
    }

    List<String> problems(String page) {
        ConfigException e = assertThrows(ConfigException.class, () -> parse(page));
        return e.problems().stream().map(ConfigProblem::toString).toList();
    }

    @Test
    void withoutAPageSectionThePageIsOff() throws Exception {
        PageSettings p = parse("").page();
        assertFalse(p.enabled());
        assertFalse(p.linksEnabled());
        assertEquals(Path.of("/var/lib/byre/link.key"), p.keyFile(parse("").history()), "the key lives beside the history");
        assertEquals(Duration.ofHours(12), p.linkValid());
        assertFalse(p.readingNeedsToken());
    }

    @Test
    void everyKey() throws Exception {
        ByreConfig c = parse("""
                page:
                  listen: 0.0.0.0:9467
                  base-url: http://192.168.1.20:9467/
                  link-key-file: keys/link.key
                  link-valid: 6h
                  reading: token
                """);
        PageSettings p = c.page();
        assertEquals("0.0.0.0", p.host());
        assertEquals(9467, p.port());
        assertEquals("http://192.168.1.20:9467", p.baseUrl(), "the trailing slash is dropped");
        assertEquals(dir.resolve("keys/link.key"), p.keyFile(c.history()), "relative to the configuration file");
        assertEquals(Duration.ofHours(6), p.linkValid());
        assertTrue(p.readingNeedsToken());
        assertTrue(p.linksEnabled());
    }

    @Test
    void mistakesAreNamedWithTheirLineAndColumn() {
        List<String> p = problems("""
                page:
                  listen: 9467
                  base-url: 192.168.1.20:9467
                  link-valid: soon
                  reading: nobody
                  refresh: 30s
                """);
        assertTrue(p.contains("byre.yaml:9:11: page.listen must be host:port such as 127.0.0.1:1883, not '9467'"), p.toString());
        assertTrue(p.stream().anyMatch(s -> s.startsWith("byre.yaml:10:13: page.base-url must be the address a phone uses")), p.toString());
        assertTrue(p.stream().anyMatch(s -> s.startsWith("byre.yaml:11:15: page.link-valid must be a duration")), p.toString());
        assertTrue(p.stream().anyMatch(s -> s.startsWith("byre.yaml:12:12: page.reading must be 'open'")), p.toString());
        assertTrue(p.stream().anyMatch(s -> s.startsWith("byre.yaml:13:3: unknown key 'refresh' in page")), p.toString());
    }

    @Test
    void aBaseUrlWithoutAListenerLeadsNowhere() {
        List<String> p = problems("""
                page:
                  base-url: http://192.168.1.20:9467
                """);
        assertEquals(List.of("byre.yaml:9:13: page.base-url is set but page.listen is not: links would lead nowhere"), p);
    }

    @Test
    void aPageWithoutBaseUrlSendsNoLinks() throws Exception {
        PageSettings p = parse("""
                page:
                  listen: 127.0.0.1:9467
                """).page();
        assertTrue(p.enabled());
        assertNull(p.baseUrl());
        assertFalse(p.linksEnabled());
    }
}
