package byre.config;

import java.io.IOException;
import java.io.InputStream;
import java.nio.file.FileSystemException;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.nio.file.attribute.BasicFileAttributes;

/**
 * Reads a file that byre is told to read (configuration, secret, token, rule file) only when it is a regular
 * file (a link to one is fine) and never more than a cap: a FIFO would block the reader for ever, a device such
 * as /dev/zero or a huge file would fill the heap. Every refusal is a {@link Refused} whose message is for the
 * operator.
 */
public final class SmallFile {
    /** Secrets and tokens: a password or key is far smaller. */
    public static final int SECRET_MAX_BYTES = 64 * 1024;
    /** The configuration file: a few hundred sensors take tens of KiB. */
    public static final int CONFIG_MAX_BYTES = 1024 * 1024;

    private SmallFile() {}

    /** A file byre will not read, with the reason in words. */
    public static final class Refused extends IOException {
        public Refused(String message) {
            super(message);
        }
    }

    /** The bytes of a regular file of at most {@code maxBytes}. */
    public static byte[] read(Path p, int maxBytes) throws IOException {
        BasicFileAttributes a = regular(p);
        if (a.size() > maxBytes) throw tooLarge(p, a.size(), maxBytes);
        try (InputStream in = Files.newInputStream(p)) {
            byte[] b = in.readNBytes(maxBytes + 1);
            if (b.length > maxBytes) throw tooLarge(p, -1, maxBytes); // it grew while being read
            return b;
        }
    }

    /** The attributes of a regular file (following links), or a {@link Refused} saying what it is instead. */
    public static BasicFileAttributes regular(Path p) throws IOException {
        BasicFileAttributes a;
        try {
            a = Files.readAttributes(p, BasicFileAttributes.class);
        } catch (NoSuchFileException e) {
            if (Files.isSymbolicLink(p)) {
                throw new Refused(p + " is a broken link (its target " + target(p) + " does not exist)");
            }
            throw e;
        } catch (FileSystemException e) {
            if (Files.isSymbolicLink(p)) throw new Refused(p + " is a link that cannot be followed (a loop of links?): " + reason(e));
            throw e;
        }
        if (a.isRegularFile()) return a;
        throw new Refused(p + " is " + (a.isDirectory() ? "a folder" : "not a regular file (a FIFO, socket or device)")
                + "; byre reads only regular files here");
    }

    /** A secret or token file's text without surrounding white space: a regular file of at most 64 KiB. */
    static String secret(Path p) throws IOException {
        return new String(read(p, SECRET_MAX_BYTES), java.nio.charset.StandardCharsets.UTF_8).strip();
    }

    /** Why a read failed, in words for a message. */
    static String describe(IOException e) {
        if (e instanceof NoSuchFileException) return "no such file";
        if (e instanceof java.nio.file.AccessDeniedException) return "permission denied";
        return e.getClass().getSimpleName() + (e.getMessage() == null ? "" : ": " + e.getMessage());
    }

    /** A size in words: bytes, KiB or MiB. */
    public static String size(long bytes) {
        if (bytes < 1024) return bytes + " bytes";
        if (bytes < 1024 * 1024) return (bytes / 1024) + " KiB";
        return String.format(java.util.Locale.ROOT, "%.1f MiB", bytes / (1024.0 * 1024.0));
    }

    private static Refused tooLarge(Path p, long actual, int maxBytes) {
        return new Refused(p + (actual >= 0 ? " has " + size(actual) + ", more" : " has more") + " than the "
                + size(maxBytes) + " byre reads from such a file");
    }

    private static String target(Path p) {
        try {
            return Files.readSymbolicLink(p).toString();
        } catch (IOException e) {
            return "?";
        }
    }

    private static String reason(FileSystemException e) {
        return e.getReason() == null ? e.getClass().getSimpleName() : e.getReason();
    }
}
