package byre.bench;

import byre.testing.ByreProcess;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;

/**
 * The packaged jar's JVM as the systemd unit starts it, for the benchmarks that launch {@code daemon/target/byre.jar}:
 * the unit's options and environment ({@link ByreProcess#SERVICE_JVM_OPTIONS}), with its class-data sharing archive
 * made the way the package makes it, by the package's own script ({@code daemon/src/deb/lib/class-archive}) from the
 * build's class list ({@code daemon/target/byre.classlist}), in a folder of the benchmark's. Extra options for trying
 * something: {@code -Dbyre.bench.jvm="..."}, after the unit's (the last of two settings wins).
 */
final class ServiceJvm {
    static final String ARCHIVE_OPTION = "-XX:SharedArchiveFile=";
    static final Path SCRIPT = Path.of("daemon/src/deb/lib/class-archive");
    static final Path CLASS_LIST = Path.of("daemon/target/byre.classlist");

    private ServiceJvm() {}

    static Map<String, String> environment() {
        return ByreProcess.SERVICE_ENVIRONMENT;
    }

    /** The unit's JVM options and the extras, without a class-data sharing archive. */
    static List<String> withoutArchive() {
        List<String> out = new ArrayList<>();
        for (String o : ByreProcess.SERVICE_JVM_OPTIONS) if (!o.startsWith(ARCHIVE_OPTION)) out.add(o);
        String extra = System.getProperty("byre.bench.jvm", "").trim();
        if (!extra.isEmpty()) out.addAll(List.of(extra.split("\\s+")));
        return out;
    }

    /**
     * The unit's JVM options and the extras; when the unit names an archive, one is made in {@code work} for {@code jar}
     * and named instead (or none, with a note, when the script or the class list is missing).
     */
    static List<String> options(Path work, Path jar) throws IOException, InterruptedException {
        List<String> out = withoutArchive();
        if (ByreProcess.SERVICE_JVM_OPTIONS.stream().noneMatch(o -> o.startsWith(ARCHIVE_OPTION))) return out;
        if (!Files.isExecutable(SCRIPT) || !Files.isRegularFile(CLASS_LIST)) {
            System.out.println("note: no class-data sharing archive (run from the repository root after mvn package): " + SCRIPT + ", " + CLASS_LIST);
            return out;
        }
        Path archive = work.resolve("byre.jsa").toAbsolutePath();
        List<String> opts = new ArrayList<>(out);
        opts.add(opts.size() - extras(), ARCHIVE_OPTION + archive);
        ProcessBuilder pb = new ProcessBuilder(SCRIPT.toAbsolutePath().toString(), archive.toString()).redirectErrorStream(true);
        pb.environment().put("BYRE_JAR", jar.toString());
        pb.environment().put("BYRE_CLASSLIST", CLASS_LIST.toAbsolutePath().toString());
        pb.environment().put("JAVA_HOME", System.getProperty("java.home"));
        pb.environment().put("BYRE_JAVA_OPTS", String.join(" ", opts));
        Process p = pb.start();
        String said = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8).strip();
        p.waitFor();
        if (!Files.isRegularFile(archive)) throw new IllegalStateException("the class-archive script made no archive: " + said);
        return opts;
    }

    private static int extras() {
        String extra = System.getProperty("byre.bench.jvm", "").trim();
        return extra.isEmpty() ? 0 : extra.split("\\s+").length;
    }
}
