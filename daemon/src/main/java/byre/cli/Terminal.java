package byre.cli;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Map;

/** Whether output goes to a person at a terminal: decides colour and progress bars. */
final class Terminal {
    private Terminal() {}

    /** ANSI colour on standard output: a console, a TERM that is not "dumb", and no NO_COLOR (no-color.org). */
    static boolean colourOnStdout(Map<String, String> env) {
        if (env.get("NO_COLOR") != null && !env.get("NO_COLOR").isEmpty()) return false;
        String term = env.get("TERM");
        if (term == null || term.isEmpty() || term.equals("dumb")) return false;
        return System.console() != null && isTty(1);
    }

    /** True when file descriptor {@code fd} of this process is a terminal (Linux: /proc/self/fd). */
    static boolean isTty(int fd) {
        try {
            String target = Files.readSymbolicLink(Path.of("/proc/self/fd/" + fd)).toString();
            return target.startsWith("/dev/pts/") || target.startsWith("/dev/tty") || target.equals("/dev/console");
        } catch (IOException | UnsupportedOperationException | SecurityException e) {
            return fd == 1 && System.console() != null;
        }
    }
}
