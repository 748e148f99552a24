package byre.daemon;

import byre.json.JsonWriter;
import byre.mqtt.MqttLink;
import byre.rules.Watch;
import byre.rules.eval.Transition;
import java.util.function.Consumer;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Logs every watch transition and publishes the current alert state, retained, under
 * {@code <prefix>/<site>/alerts/<watch>/<zone>} (design section 7).
 */
final class AlertLog implements WatchStage.Outcomes {
    private static final Logger LOG = LoggerFactory.getLogger("byre.alerts");

    private final MqttLink link;
    private final String site;
    private final String base;
    private final Consumer<String> console;
    private final java.time.ZoneId zone;

    AlertLog(MqttLink link, String prefix, String site, java.time.ZoneId zone, Consumer<String> console) {
        this.zone = zone;
        this.link = link;
        this.site = site;
        this.base = prefix + "/" + site + "/alerts/";
        this.console = console;
    }

    @Override
    public void transition(Transition t, Watch watch) {
        String line = t.kind().event() + " " + t.level().id() + " " + t.watch() + " " + t.zone() + ": " + t.message();
        if (t.kind() == Transition.Kind.RAISED) {
            LOG.warn(line);
        } else {
            LOG.info(line);
        }
        if (console != null) {
            console.accept(java.time.format.DateTimeFormatter.ofPattern("EEE HH:mm", java.util.Locale.ROOT)
                    .format(t.at().atZone(zone)) + "  ALERT " + line);
        }
        String json = new JsonWriter().field("event", t.kind().event()).field("site", site).field("watch", t.watch())
                .field("zone", t.zone()).field("level", t.level().id()).field("quantity", t.quantity())
                .field("value", t.value()).field("unit", t.unit()).field("since", t.since().toString())
                .field("at", t.at().toString()).field("message", t.message()).toString();
        link.publish(base + t.watch() + "/" + t.zone(), json, 1, true);
    }
}
