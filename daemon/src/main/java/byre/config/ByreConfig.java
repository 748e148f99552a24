package byre.config;

import java.nio.file.Path;
import java.time.ZoneId;
import java.util.List;
import java.util.Map;

/** A loaded, validated configuration (README, Configuration). Maps keep the file's order. */
public record ByreConfig(Path file, String site, ZoneId timezone, DisplayUnits units, MqttSettings mqtt,
                         Map<String, SensorConfig> sensors, Map<String, ZoneConfig> zones,
                         Map<String, ChannelConfig> channels, List<Path> rulePaths,
                         HistorySettings history, AdminSettings admin, AlertSettings alerts, PageSettings page,
                         CentralSettings central) {

    /** A barn's configuration (no {@code central:} section). */
    public ByreConfig(Path file, String site, ZoneId timezone, DisplayUnits units, MqttSettings mqtt,
                      Map<String, SensorConfig> sensors, Map<String, ZoneConfig> zones,
                      Map<String, ChannelConfig> channels, List<Path> rulePaths,
                      HistorySettings history, AdminSettings admin, AlertSettings alerts, PageSettings page) {
        this(file, site, timezone, units, mqtt, sensors, zones, channels, rulePaths, history, admin, alerts, page, CentralSettings.NONE);
    }

    /** How values are shown in messages and on the console. */
    public enum DisplayUnits { METRIC, US }

    public ByreConfig withMqtt(MqttSettings m) {
        return new ByreConfig(file, site, timezone, units, m, sensors, zones, channels, rulePaths, history, admin, alerts, page, central);
    }

    public ByreConfig withHistory(HistorySettings h) {
        return new ByreConfig(file, site, timezone, units, mqtt, sensors, zones, channels, rulePaths, h, admin, alerts, page, central);
    }

    public ByreConfig withAdmin(AdminSettings a) {
        return new ByreConfig(file, site, timezone, units, mqtt, sensors, zones, channels, rulePaths, history, a, alerts, page, central);
    }

    public ByreConfig withZones(Map<String, ZoneConfig> z) {
        return new ByreConfig(file, site, timezone, units, mqtt, sensors, z, channels, rulePaths, history, admin, alerts, page, central);
    }

    /** This configuration with more central sites (found on the broker): their entries, sensors and zones. */
    public ByreConfig withCentralSites(java.util.Collection<CentralSettings.Site> more) {
        if (more.isEmpty()) return this;
        Map<String, SensorConfig> se = new java.util.LinkedHashMap<>(sensors);
        Map<String, ZoneConfig> zo = new java.util.LinkedHashMap<>(zones);
        CentralSettings c = central;
        for (CentralSettings.Site s : more) {
            CentralSettings.addSite(s, mqtt.publishPrefix(), se, zo);
            c = c.with(s);
        }
        return new ByreConfig(file, site, timezone, units, mqtt, se, zo, channels, rulePaths, history, admin, alerts, page, c);
    }

    public ByreConfig withRulePaths(List<Path> paths) {
        return new ByreConfig(file, site, timezone, units, mqtt, sensors, zones, channels, paths, history, admin, alerts, page, central);
    }
}
