package byre.cli;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Map;

/**
 * Whether log lines need a time of their own. journald stamps every line it reads, so under it byre prints
 * none; on a terminal or into a file each line starts with the local date and time. systemd sets
 * {@code JOURNAL_STREAM=<device>:<inode>} for a service whose output goes to the journal (systemd.exec(5));
 * the variable is inherited, so standard output counts as the journal only when it is that very stream.
 */
final class LogTime {
    /** The logback property the console pattern starts with. */
    static final String PROPERTY = "byre.log.time";
    static final String PATTERN = "%d{yyyy-MM-dd HH:mm:ss.SSS} ";

    private LogTime() {}

    /** Sets {@link #PROPERTY} before logging starts, unless the user set it. */
    static void configure() {
        if (System.getProperty(PROPERTY) != null) return;
        System.setProperty(PROPERTY, prefix(System.getenv(), stdoutDeviceInode()));
    }

    /** The pattern prefix: empty when standard output ({@code stdout}, "device:inode" or null if unknown) is journald's. */
    static String prefix(Map<String, String> env, String stdout) {
        String journal = env.get("JOURNAL_STREAM");
        if (journal == null || journal.isBlank()) return PATTERN;
        if (stdout == null) return ""; // cannot tell: trust the variable
        return journal.strip().equals(stdout) ? "" : PATTERN;
    }

    /** "device:inode" of standard output, as systemd writes them (decimal), or null when unknown. */
    static String stdoutDeviceInode() {
        try {
            Path fd = Path.of("/proc/self/fd/1");
            Object dev = Files.getAttribute(fd, "unix:dev");
            Object ino = Files.getAttribute(fd, "unix:ino");
            return dev + ":" + ino;
        } catch (Exception e) {
            return null;
        }
    }
}
