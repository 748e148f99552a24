package byre.page;

import java.nio.charset.StandardCharsets;
import java.security.InvalidKeyException;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.util.Arrays;
import java.util.Base64;
import java.util.HashMap;
import java.util.Map;
import java.util.Optional;
import java.util.regex.Pattern;
import javax.crypto.Mac;
import javax.crypto.spec.SecretKeySpec;

/**
 * Makes and checks one-tap acknowledgement links {@code <base-url>/a/<incident>/<expiry>/<signature>}:
 * {@code expiry} is Unix seconds, {@code signature} the first 128 bits of HMAC-SHA-256 (RFC 2104, FIPS 180-4) over
 * the incident id and the expiry, in URL-safe base64 without padding (22 characters, short enough for a text
 * message). A link is good for its one incident, until its expiry, and once: {@link #redeem} remembers what was
 * used until it would have expired anyway (after a restart the incident's own acknowledged state still refuses a
 * second acknowledgement). Time comes from the caller or the injected clock.
 */
public final class AckLinkSigner {
    /** What a link is worth. */
    public enum Verdict {
        /** Signed by this byre, for this incident, not expired, not used. */
        VALID,
        /** Not signed by this byre's key (altered, made up, or for another incident). */
        FORGED,
        /** Signed, but its time is over. */
        EXPIRED,
        /** Signed and already used to acknowledge. */
        USED
    }

    /** Incident ids byre makes are short lower-case base-32; this is the widest form a link accepts. */
    static final Pattern INCIDENT = Pattern.compile("[A-Za-z0-9_-]{1,64}");
    private static final Pattern EXPIRY = Pattern.compile("[0-9]{1,12}");
    private static final Pattern SIGNATURE = Pattern.compile("[A-Za-z0-9_-]{22}");
    private static final int SIGNATURE_BYTES = 16;
    /** Domain separation: a signature of this kind can never be mistaken for another use of the same key. */
    private static final String PURPOSE = "byre acknowledgement link v1\n";

    private final SecretKeySpec key;
    private final String baseUrl;
    private final Duration valid;
    private final Clock clock;
    /** Signatures already redeemed, with their expiry (Unix seconds), dropped once expired. */
    private final Map<String, Long> used = new HashMap<>();

    /**
     * @param baseUrl where the phone reaches the page, without a trailing slash (e.g. {@code http://192.168.1.20:9467})
     * @param valid   how long a link works after it was made
     */
    public AckLinkSigner(byte[] key, String baseUrl, Duration valid, Clock clock) {
        if (key == null || key.length < LinkKey.BYTES) throw new IllegalArgumentException("the link key needs at least " + LinkKey.BYTES + " bytes");
        if (valid.isNegative() || valid.isZero()) throw new IllegalArgumentException("links must be valid for some time, not " + valid);
        this.key = new SecretKeySpec(key.clone(), "HmacSHA256");
        this.baseUrl = baseUrl;
        this.valid = valid;
        this.clock = clock;
    }

    /** The link for one incident, made at {@code now}, working until {@code now} plus the configured time. */
    public String link(String incidentId, Instant now) {
        if (incidentId == null || !INCIDENT.matcher(incidentId).matches()) {
            throw new IllegalArgumentException("not an incident id: " + incidentId);
        }
        long expiry = now.plus(valid).getEpochSecond();
        return baseUrl + "/a/" + incidentId + "/" + expiry + "/" + sign(incidentId, expiry);
    }

    /** The link for an incident as of the injected clock; empty for an id a link cannot carry. */
    public Optional<String> linkFor(String incidentId) {
        if (incidentId == null || !INCIDENT.matcher(incidentId).matches()) return Optional.empty();
        return Optional.of(link(incidentId, clock.instant()));
    }

    /** Checks a link's parts (as they appear in its path) without using it up. */
    public synchronized Verdict check(String incidentId, String expiry, String signature, Instant now) {
        if (!authentic(incidentId, expiry, signature)) return Verdict.FORGED;
        if (used.containsKey(signature)) return Verdict.USED;
        return now.getEpochSecond() >= Long.parseLong(expiry) ? Verdict.EXPIRED : Verdict.VALID;
    }

    /**
     * Checks a link and, when it is {@link Verdict#VALID}, marks it used in the same step, so of two presses only
     * one gets {@code VALID}. The caller acknowledges only on {@code VALID}.
     */
    public synchronized Verdict redeem(String incidentId, String expiry, String signature, Instant now) {
        Verdict v = check(incidentId, expiry, signature, now);
        long nowS = now.getEpochSecond();
        used.values().removeIf(exp -> exp <= nowS);
        if (v == Verdict.VALID) used.put(signature, Long.parseLong(expiry));
        return v;
    }

    private boolean authentic(String incidentId, String expiry, String signature) {
        if (incidentId == null || expiry == null || signature == null) return false;
        if (!INCIDENT.matcher(incidentId).matches() || !EXPIRY.matcher(expiry).matches() || !SIGNATURE.matcher(signature).matches()) {
            return false;
        }
        // The text itself is compared, not its decoded bytes: the last of the 22 characters carries 2 bits and 4 unused
        // ones, so four spellings decode alike, and a link used once must not work again in another spelling.
        byte[] given = signature.getBytes(StandardCharsets.US_ASCII);
        byte[] expected = sign(incidentId, Long.parseLong(expiry)).getBytes(StandardCharsets.US_ASCII);
        return MessageDigest.isEqual(given, expected); // constant time
    }

    String sign(String incidentId, long expiry) {
        try {
            Mac mac = Mac.getInstance("HmacSHA256");
            mac.init(key);
            byte[] full = mac.doFinal((PURPOSE + incidentId + "\n" + expiry).getBytes(StandardCharsets.UTF_8));
            return Base64.getUrlEncoder().withoutPadding().encodeToString(Arrays.copyOf(full, SIGNATURE_BYTES));
        } catch (NoSuchAlgorithmException | InvalidKeyException e) {
            throw new IllegalStateException("HMAC-SHA-256 is part of every Java 17 runtime", e);
        }
    }
}
