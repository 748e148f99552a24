package byre.page;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.FileAlreadyExistsException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.attribute.PosixFilePermission;
import java.nio.file.attribute.PosixFilePermissions;
import java.security.SecureRandom;
import java.util.HexFormat;
import java.util.Set;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The secret key that signs acknowledgement links: 32 random bytes as 64 hex digits in a file only byre's user may
 * read. The package makes it at install; {@link #loadOrCreate} makes it at the first start when it is missing (an
 * install by hand). The key never enters a log line or a message; only the file's path does.
 */
public final class LinkKey {
    private static final Logger LOG = LoggerFactory.getLogger(LinkKey.class);
    static final int BYTES = 32;
    private static final Set<PosixFilePermission> OWNER_ONLY = PosixFilePermissions.fromString("rw-------");

    private LinkKey() {}

    /**
     * Reads the key, creating the file (owner read/write only) with a fresh random key when it does not exist.
     *
     * @throws IOException with a message naming the file when it cannot be read or made, or does not hold a key
     */
    public static byte[] loadOrCreate(Path file) throws IOException {
        if (!Files.exists(file)) {
            try {
                create(file);
                LOG.info("made a new key for acknowledgement links in {} (owner-only; links signed with an earlier key no longer work)", file);
            } catch (FileAlreadyExistsException raced) {
                // another process made it first: read theirs
            }
        }
        String text;
        try {
            text = Files.readString(file, StandardCharsets.US_ASCII).strip();
        } catch (IOException e) {
            throw new IOException("cannot read the link key " + file + ": " + e.getMessage(), e);
        }
        byte[] key;
        try {
            key = HexFormat.of().parseHex(text);
        } catch (IllegalArgumentException e) {
            throw new IOException("the link key " + file + " is not hexadecimal; delete it and byre makes a new one");
        }
        if (key.length < BYTES) {
            throw new IOException("the link key " + file + " is shorter than " + BYTES + " bytes; delete it and byre makes a new one");
        }
        warnIfShared(file);
        return key;
    }

    private static void create(Path file) throws IOException {
        Path dir = file.toAbsolutePath().getParent();
        if (dir != null) Files.createDirectories(dir);
        byte[] key = new byte[BYTES];
        new SecureRandom().nextBytes(key);
        byte[] text = (HexFormat.of().formatHex(key) + "\n").getBytes(StandardCharsets.US_ASCII);
        try {
            // Created with owner-only permissions in one step, so the key is never readable by others, not even briefly.
            Files.createFile(file, PosixFilePermissions.asFileAttribute(OWNER_ONLY));
        } catch (UnsupportedOperationException notPosix) {
            Files.createFile(file);
        }
        Files.write(file, text);
    }

    private static void warnIfShared(Path file) {
        try {
            Set<PosixFilePermission> p = Files.getPosixFilePermissions(file);
            if (!OWNER_ONLY.containsAll(p)) {
                LOG.warn("the link key {} can be read by others ({}); run: chmod 600 {}", file, PosixFilePermissions.toString(p), file);
            }
        } catch (UnsupportedOperationException | IOException ignored) {
            // not a POSIX file system: nothing to check
        }
    }
}
