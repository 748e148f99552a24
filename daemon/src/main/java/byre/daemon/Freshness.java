package byre.daemon;

import byre.config.ByreConfig;
import byre.config.SensorConfig;
import byre.config.Durations;
import byre.config.ZoneConfig;
import java.time.Duration;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * How long a zone's readings count: a zone without {@code max-age} in the configuration gets one from how
 * often its sensors really report (median gap, see {@link ReportingIntervals}): {@link #FACTOR} times the
 * slowest sensor's interval, at least {@link #FLOOR}. Until anything is learnt it is
 * {@link ZoneConfig#UNLEARNT_MAX_AGE}. Also says where a sensor reports too seldom for its zone's max-age.
 */
public final class Freshness {
    /**
     * 2.5 intervals: one report may be missed, and the next may come late by half an interval (radio
     * sensors drift and jitter), before the stream counts as no data.
     */
    static final double FACTOR = 2.5;
    /** Below this, scheduling noise of a busy broker would make a fast sensor look silent. */
    static final Duration FLOOR = Duration.ofMinutes(2);

    private Freshness() {}

    /** The max-age that fits a stream reporting every {@code interval}, rounded up to whole seconds. */
    public static Duration learnt(Duration interval) {
        long ms = (long) Math.ceil(interval.toMillis() * FACTOR / 1000.0) * 1000L;
        return Duration.ofMillis(Math.max(FLOOR.toMillis(), ms));
    }

    /** How often one stream of a zone reports: a sensor ({@code calf-pen-1.dry-bulb (sensor pen1-dry)}) or a zone stream. */
    public record StreamInterval(String zone, String stream, Duration interval) {}

    /** The configured sensors' intervals as streams of their zones. */
    public static List<StreamInterval> ofSensors(ByreConfig config, Map<String, Duration> sensorIntervals) {
        List<StreamInterval> out = new ArrayList<>();
        for (ZoneConfig z : config.zones().values()) {
            for (String s : z.sensors()) {
                Duration iv = sensorIntervals.get(s);
                SensorConfig sc = config.sensors().get(s);
                if (iv != null && sc != null) out.add(new StreamInterval(z.id(), z.id() + "." + sc.quantity().id() + " (sensor " + s + ")", iv));
            }
        }
        return out;
    }

    /** {@link #resolve(ByreConfig, List)} from the sensors' intervals. */
    public static ByreConfig resolve(ByreConfig config, Map<String, Duration> sensorIntervals) {
        return resolve(config, ofSensors(config, sensorIntervals));
    }

    /**
     * The configuration with every zone that has no {@code max-age} of its own given the learnt one, from its
     * slowest stream with a known interval; zones with nothing learnt keep the fixed default.
     */
    public static ByreConfig resolve(ByreConfig config, List<StreamInterval> intervals) {
        Map<String, Duration> slowest = slowestByZone(intervals);
        Map<String, ZoneConfig> zones = new LinkedHashMap<>();
        boolean changed = false;
        for (ZoneConfig z : config.zones().values()) {
            Duration iv = slowest.get(z.id());
            if (z.maxAgeLearnt() && iv != null) {
                zones.put(z.id(), z.withLearntMaxAge(learnt(iv)));
                changed = true;
            } else {
                zones.put(z.id(), z);
            }
        }
        return changed ? config.withZones(zones) : config;
    }

    /** The learnt max-age of each zone that has a stream with a known interval (for zones without a configuration). */
    public static Map<String, Duration> learntByZone(List<StreamInterval> intervals) {
        Map<String, Duration> out = new LinkedHashMap<>();
        slowestByZone(intervals).forEach((z, iv) -> out.put(z, learnt(iv)));
        return out;
    }

    private static Map<String, Duration> slowestByZone(List<StreamInterval> intervals) {
        Map<String, Duration> out = new LinkedHashMap<>();
        for (StreamInterval i : intervals) out.merge(i.zone(), i.interval(), (a, b) -> a.compareTo(b) >= 0 ? a : b);
        return out;
    }

    /** {@link #warnings(ByreConfig, List)} from the sensors' intervals. */
    public static List<String> warnings(ByreConfig config, Map<String, Duration> sensorIntervals) {
        return warnings(config, ofSensors(config, sensorIntervals));
    }

    /**
     * One line per stream whose reporting interval is close to or above its zone's max-age: one late or
     * missed report then leaves the stream without data, so holds fall back and {@code silent()} fires.
     * "Close" is more than half the max-age. {@code config} should already be {@link #resolve}d.
     */
    public static List<String> warnings(ByreConfig config, List<StreamInterval> intervals) {
        List<String> out = new ArrayList<>();
        for (StreamInterval i : intervals) {
            ZoneConfig z = config.zones().get(i.zone());
            if (z == null || i.interval().multipliedBy(2).compareTo(z.maxAge()) <= 0) continue;
            String advice = z.maxAgeLearnt() ? "" : "; set 'max-age: " + Durations.format(wholeMinutes(learnt(i.interval()))) + "' for zone "
                    + z.id() + " (" + (config.file() == null ? "" : config.file().getFileName() + ":") + z.line()
                    + "), or leave max-age out to have it follow the sensors";
            out.add(warning(i.stream(), i.interval(), z.id(), z.maxAge(), advice));
        }
        return out;
    }

    /** The warning for one stream: names it, its interval and the max-age, and says what goes wrong. */
    static String warning(String stream, Duration interval, String zone, Duration maxAge, String advice) {
        return "stream " + stream + " reports every " + text(interval) + ", close to or above the max-age of zone " + zone
                + " (" + text(maxAge) + "): one late or missed reading leaves it without data,"
                + " so watches on it fall back and silent() fires" + advice;
    }

    private static Duration wholeMinutes(Duration d) {
        return Duration.ofMinutes((d.toSeconds() + 59) / 60);
    }

    /** A duration as rule files and the log write it: 90s -> 1m30s, 300s -> 5m. */
    static String text(Duration d) {
        return byre.rules.DurationText.of(d);
    }
}
