package byre.config;

import java.time.Duration;
import java.util.List;

/**
 * One zone: a pen, shed or room whose sensors are combined. Elevation (metres) gives the station
 * pressure when no pressure sensor is listed; NaN means none was given (101.325 kPa is used).
 */
public record ZoneConfig(String id, List<String> groups, List<String> sensors, double elevationM,
                         Psychrometer psychrometer, Duration maxAge, String thiVariant, int line) {
    public enum Psychrometer { ASPIRATED, SCREEN }
}
