package byre.daemon;

import byre.config.SmallFile;
import byre.rules.RuleSource;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.attribute.BasicFileAttributes;
import java.util.ArrayList;
import java.util.List;
import java.util.stream.Stream;

/**
 * Reads rule files: each path is a {@code *.rules} file or a folder of them (read in name order). Sizes are
 * capped before anything is read, so no rule file can fill the heap at start, at {@code byre check} or at a
 * reload: one file at most {@link #FILE_MAX_BYTES}, all of them together at most {@link #TOTAL_MAX_BYTES}.
 * A {@code *.rules} entry that is not a readable regular file (a broken link, a loop of links, a FIFO) is an
 * error, not silently skipped: the operator meant it to be a rule file.
 */
public final class RuleFiles {
    /** One rule file: a large barn's rules take a few KiB; this is some thousand watches. */
    public static final int FILE_MAX_BYTES = 256 * 1024;
    /** All rule files together (what one compile holds in memory). */
    public static final int TOTAL_MAX_BYTES = 1024 * 1024;

    private RuleFiles() {}

    /** The files the paths name, in a stable order; a missing path or a broken {@code *.rules} entry is an error. */
    public static List<Path> list(List<Path> paths) throws IOException {
        List<Path> out = new ArrayList<>();
        for (Path p : paths) {
            if (Files.isDirectory(p)) {
                List<Path> entries;
                try (Stream<Path> s = Files.list(p)) {
                    entries = s.filter(f -> f.getFileName().toString().endsWith(".rules")).sorted().toList();
                }
                for (Path f : entries) {
                    SmallFile.regular(f);
                    out.add(f);
                }
            } else if (Files.isRegularFile(p)) {
                out.add(p);
            } else if (Files.exists(p) || Files.isSymbolicLink(p)) {
                SmallFile.regular(p); // says what it is instead
                throw new IOException(p + ": not a rule file or folder");
            } else {
                throw new IOException(p + ": no such rule file or folder");
            }
        }
        return out;
    }

    /** The sources of all rule files, or an error naming the file that is too large or unreadable. */
    public static List<RuleSource> read(List<Path> paths) throws IOException {
        List<Path> files = list(paths);
        long total = 0;
        for (Path f : files) {
            long size = SmallFile.regular(f).size();
            if (size > FILE_MAX_BYTES) {
                throw new SmallFile.Refused(f + " has " + SmallFile.size(size) + ", more than the " + SmallFile.size(FILE_MAX_BYTES)
                        + " a rule file may have; split it or remove what is not rules");
            }
            total += size;
        }
        if (total > TOTAL_MAX_BYTES) {
            throw new SmallFile.Refused("the rule files have " + SmallFile.size(total) + " together, more than the "
                    + SmallFile.size(TOTAL_MAX_BYTES) + " byre reads; remove files that are not rules from " + paths);
        }
        List<RuleSource> sources = new ArrayList<>();
        long read = 0;
        for (Path f : files) {
            byte[] bytes = SmallFile.read(f, FILE_MAX_BYTES);
            read += bytes.length;
            if (read > TOTAL_MAX_BYTES) throw new SmallFile.Refused("the rule files grew past " + SmallFile.size(TOTAL_MAX_BYTES) + " while being read");
            sources.add(RuleSource.ofBytes(f.toString(), bytes));
        }
        return sources;
    }

    /** A fingerprint of the files (names, sizes, modification times) to notice edits cheaply. */
    public static String fingerprint(List<Path> paths) {
        StringBuilder sb = new StringBuilder();
        try {
            for (Path f : list(paths)) {
                BasicFileAttributes a = Files.readAttributes(f, BasicFileAttributes.class);
                sb.append(f).append(':').append(a.size()).append(':').append(a.lastModifiedTime().toMillis()).append(';');
            }
        } catch (IOException e) {
            sb.append("unreadable:").append(e.getMessage());
        }
        return sb.toString();
    }
}
