package byre.alerts;

import java.time.Duration;
import java.time.Instant;
import java.util.List;
import java.util.Map;

/**
 * What happened overnight, gathered from the history for the morning digest: per zone the minimum and maximum
 * of the key quantities and the time spent in each THI category, the incidents, and the sensors that fell silent.
 */
public record NightDigest(Instant from, Instant to, List<ZoneNight> zones, List<IncidentSpan> incidents, List<String> silentSensors) {
    public NightDigest {
        zones = List.copyOf(zones);
        incidents = List.copyOf(incidents);
        silentSensors = List.copyOf(silentSensors);
    }

    /** {@code extremes}: quantity id -> {min, max} in canonical units; {@code thiCategories}: category -> time in it (ordered). */
    public record ZoneNight(String zone, Map<String, double[]> extremes, Map<String, String> units, Map<String, Duration> thiCategories) {}

    /** One incident of the night; {@code end} is null while it is still open. */
    public record IncidentSpan(String watch, String zone, String level, Instant start, Instant end) {}
}
