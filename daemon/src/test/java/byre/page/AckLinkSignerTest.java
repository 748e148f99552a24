package byre.page;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.page.AckLinkSigner.Verdict;
import byre.testing.MutableClock;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.attribute.PosixFilePermissions;
import java.time.Duration;
import java.time.Instant;
import java.util.Arrays;
import java.util.Base64;
import java.util.HexFormat;
import javax.crypto.Mac;
import javax.crypto.spec.SecretKeySpec;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** Signed acknowledgement links: made, checked, refused when forged, expired, for another incident, or used. */
class AckLinkSignerTest {
    static final Instant NOW = Instant.parse("2026-07-14T02:05:00Z");
    static final byte[] KEY = HexFormat.of().parseHex("000102030405060708090a0b0c0d0e0f101112131415161718191a1b1c1d1e1f");
    final MutableClock clock = new MutableClock(NOW);
    final AckLinkSigner signer = new AckLinkSigner(KEY, "http://192.168.1.20:9467", Duration.ofHours(12), clock);

    @TempDir
    Path dir;

    /** The parts after /a/ of a link: incident, expiry, signature. */
    static String[] parts(String link) {
        String path = link.substring(link.indexOf("/a/") + 3);
        return path.split("/");
    }

    @Test
    void aLinkNamesItsIncidentItsExpiryAndAnHmacSha256Signature() throws Exception {
        String link = signer.link("k7m2xq9rtb", NOW);
        long expiry = NOW.plus(Duration.ofHours(12)).getEpochSecond();
        assertTrue(link.startsWith("http://192.168.1.20:9467/a/k7m2xq9rtb/" + expiry + "/"), link);
        // Recomputed with the JDK's HMAC-SHA-256 (RFC 2104) over the documented message, independently of the signer.
        Mac mac = Mac.getInstance("HmacSHA256");
        mac.init(new SecretKeySpec(KEY, "HmacSHA256"));
        byte[] full = mac.doFinal(("byre acknowledgement link v1\nk7m2xq9rtb\n" + expiry).getBytes(StandardCharsets.UTF_8));
        String expected = Base64.getUrlEncoder().withoutPadding().encodeToString(Arrays.copyOf(full, 16));
        assertEquals(expected, parts(link)[2]);
        assertEquals(22, expected.length(), "128 bits in URL-safe base64");
        assertEquals(link, signer.linkFor("k7m2xq9rtb").orElseThrow(), "linkFor uses the injected clock");
    }

    @Test
    void aGoodLinkIsValidUntilItsExpiryAndThenExpired() {
        String[] p = parts(signer.link("k7m2xq9rtb", NOW));
        assertEquals(Verdict.VALID, signer.check(p[0], p[1], p[2], NOW));
        assertEquals(Verdict.VALID, signer.check(p[0], p[1], p[2], NOW.plus(Duration.ofHours(12)).minusSeconds(1)));
        assertEquals(Verdict.EXPIRED, signer.check(p[0], p[1], p[2], NOW.plus(Duration.ofHours(12))));
        assertEquals(Verdict.EXPIRED, signer.redeem(p[0], p[1], p[2], NOW.plus(Duration.ofDays(3))), "an expired link is not used up either");
    }

    @Test
    void forgedLinksAreRefused() {
        String[] p = parts(signer.link("k7m2xq9rtb", NOW));
        char[] sig = p[2].toCharArray();
        sig[5] = sig[5] == 'A' ? 'B' : 'A';
        assertEquals(Verdict.FORGED, signer.check(p[0], p[1], new String(sig), NOW), "one character of the signature changed");
        long later = Long.parseLong(p[1]) + 86_400;
        assertEquals(Verdict.FORGED, signer.check(p[0], Long.toString(later), p[2], NOW), "expiry pushed back by hand");
        assertEquals(Verdict.FORGED, signer.check(p[0], p[1], p[2].substring(0, 21), NOW), "cut short");
        assertEquals(Verdict.FORGED, signer.check(p[0], p[1], "", NOW));
        assertEquals(Verdict.FORGED, signer.check("<script>", p[1], p[2], NOW));
        assertEquals(Verdict.FORGED, signer.check(p[0], "-5", p[2], NOW));
        AckLinkSigner otherKey = new AckLinkSigner(HexFormat.of().parseHex("ff".repeat(32)), "http://x", Duration.ofHours(12), clock);
        String[] q = parts(otherKey.link("k7m2xq9rtb", NOW));
        assertEquals(Verdict.FORGED, signer.check(q[0], q[1], q[2], NOW), "signed with another byre's key");
    }

    @Test
    void aLinkWorksForItsOwnIncidentOnly() {
        String[] p = parts(signer.link("k7m2xq9rtb", NOW));
        assertEquals(Verdict.FORGED, signer.check("p3n8wd4hsa", p[1], p[2], NOW));
        assertEquals(Verdict.FORGED, signer.redeem("p3n8wd4hsa", p[1], p[2], NOW));
        assertEquals(Verdict.VALID, signer.check(p[0], p[1], p[2], NOW), "trying it on another incident did not use it up");
    }

    @Test
    void aLinkWorksOnce() {
        String[] p = parts(signer.link("k7m2xq9rtb", NOW));
        assertEquals(Verdict.VALID, signer.redeem(p[0], p[1], p[2], NOW));
        assertEquals(Verdict.USED, signer.check(p[0], p[1], p[2], NOW.plusSeconds(5)));
        assertEquals(Verdict.USED, signer.redeem(p[0], p[1], p[2], NOW.plusSeconds(5)));
        // A second link for the same incident (a reminder's) is its own link, but acknowledging twice is refused by the incident.
        String[] r = parts(signer.link("k7m2xq9rtb", NOW.plusSeconds(60)));
        assertNotEquals(p[1], r[1]);
        assertEquals(Verdict.VALID, signer.check(r[0], r[1], r[2], NOW.plusSeconds(60)));
    }

    @Test
    void anotherSpellingOfTheSameSignatureIsNotAFreshLink() {
        String[] p = parts(signer.link("k7m2xq9rtb", NOW));
        // 128 bits in 22 base64 characters leave 4 unused bits in the last one: the next letter up decodes to the same bytes.
        String alphabet = "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789-_";
        char last = p[2].charAt(21);
        String twin = p[2].substring(0, 21) + alphabet.charAt(alphabet.indexOf(last) + 1);
        assertTrue(Arrays.equals(Base64.getUrlDecoder().decode(p[2]), Base64.getUrlDecoder().decode(twin)), "the JDK decodes both alike");
        assertEquals(Verdict.VALID, signer.redeem(p[0], p[1], p[2], NOW));
        assertEquals(Verdict.FORGED, signer.redeem(p[0], p[1], twin, NOW), "not a second use in disguise");
    }

    @Test
    void checkingDoesNotUseALinkUp() {
        String[] p = parts(signer.link("k7m2xq9rtb", NOW));
        for (int i = 0; i < 3; i++) assertEquals(Verdict.VALID, signer.check(p[0], p[1], p[2], NOW), "a preview fetch changes nothing");
        assertEquals(Verdict.VALID, signer.redeem(p[0], p[1], p[2], NOW));
    }

    @Test
    void idsALinkCannotCarryGetNoLink() {
        assertTrue(signer.linkFor("a/b").isEmpty());
        assertTrue(signer.linkFor("").isEmpty());
        assertThrows(IllegalArgumentException.class, () -> signer.link("x y", NOW));
        assertThrows(IllegalArgumentException.class, () -> new AckLinkSigner(new byte[8], "http://x", Duration.ofHours(1), clock));
    }

    @Test
    void theKeyIsMadeOnceWithOwnerOnlyPermissions() throws Exception {
        Path file = dir.resolve("sub/link.key");
        byte[] first = LinkKey.loadOrCreate(file);
        assertEquals(32, first.length);
        assertEquals("rw-------", PosixFilePermissions.toString(Files.getPosixFilePermissions(file)));
        assertTrue(Files.readString(file).strip().matches("[0-9a-f]{64}"));
        byte[] again = LinkKey.loadOrCreate(file);
        assertTrue(Arrays.equals(first, again), "the second start reads the same key");
        assertFalse(Arrays.equals(first, LinkKey.loadOrCreate(dir.resolve("other.key"))), "a new key is random");
    }

    @Test
    void aDamagedKeyFileIsAClearErrorNamingTheFile() throws Exception {
        Path file = dir.resolve("link.key");
        Files.writeString(file, "not a key\n");
        Exception e = assertThrows(java.io.IOException.class, () -> LinkKey.loadOrCreate(file));
        assertTrue(e.getMessage().contains(file.toString()) && e.getMessage().contains("not hexadecimal"), e.getMessage());
        Files.writeString(file, "abcd\n");
        e = assertThrows(java.io.IOException.class, () -> LinkKey.loadOrCreate(file));
        assertTrue(e.getMessage().contains("shorter than 32 bytes"), e.getMessage());
    }
}
