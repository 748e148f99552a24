package byre.daemon;

import byre.rules.RuleSource;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.stream.Stream;

/** Reads rule files: each path is a {@code *.rules} file or a folder of them (read in name order). */
public final class RuleFiles {
    private RuleFiles() {}

    /** The files the paths name, in a stable order; a missing path is an error. */
    public static List<Path> list(List<Path> paths) throws IOException {
        List<Path> out = new ArrayList<>();
        for (Path p : paths) {
            if (Files.isDirectory(p)) {
                try (Stream<Path> s = Files.list(p)) {
                    s.filter(f -> f.getFileName().toString().endsWith(".rules") && Files.isRegularFile(f)).sorted().forEach(out::add);
                }
            } else if (Files.isRegularFile(p)) {
                out.add(p);
            } else {
                throw new IOException(p + ": no such rule file or folder");
            }
        }
        return out;
    }

    public static List<RuleSource> read(List<Path> paths) throws IOException {
        List<RuleSource> sources = new ArrayList<>();
        for (Path f : list(paths)) sources.add(RuleSource.ofBytes(f.toString(), Files.readAllBytes(f)));
        return sources;
    }

    /** A fingerprint of the files (names, sizes, modification times) to notice edits cheaply. */
    public static String fingerprint(List<Path> paths) {
        StringBuilder sb = new StringBuilder();
        try {
            for (Path f : list(paths)) {
                sb.append(f).append(':').append(Files.size(f)).append(':').append(Files.getLastModifiedTime(f).toMillis()).append(';');
            }
        } catch (IOException e) {
            sb.append("unreadable:").append(e.getMessage());
        }
        return sb.toString();
    }
}
