package byre.config;

import java.time.Duration;
import java.util.List;

/**
 * One zone: a pen, shed or room whose sensors are combined. Elevation (metres) gives the station
 * pressure when no pressure sensor is listed; NaN means none was given (101.325 kPa is used).
 * {@code maxAgeLearnt} is true when the file gives no {@code max-age}: then {@code maxAge} is
 * {@link #UNLEARNT_MAX_AGE} until the zone's reporting interval is learnt from the history
 * ({@code byre.daemon.Freshness}).
 */
public record ZoneConfig(String id, List<String> groups, List<String> sensors, double elevationM,
                         Psychrometer psychrometer, Duration maxAge, String thiVariant, int line, boolean maxAgeLearnt) {
    public enum Psychrometer { ASPIRATED, SCREEN }

    /**
     * The max-age of a zone without one in the file, before its sensors' interval is known: a sensor
     * reporting every 5 minutes (common for battery and radio sensors) may miss one report and still count.
     */
    public static final Duration UNLEARNT_MAX_AGE = Duration.ofMinutes(11);

    /** A zone whose max-age is set in the file. */
    public ZoneConfig(String id, List<String> groups, List<String> sensors, double elevationM,
                      Psychrometer psychrometer, Duration maxAge, String thiVariant, int line) {
        this(id, groups, sensors, elevationM, psychrometer, maxAge, thiVariant, line, false);
    }

    /** The same zone with a max-age learnt from its sensors (still marked as learnt). */
    public ZoneConfig withLearntMaxAge(Duration learnt) {
        return new ZoneConfig(id, groups, sensors, elevationM, psychrometer, learnt, thiVariant, line, true);
    }
}
