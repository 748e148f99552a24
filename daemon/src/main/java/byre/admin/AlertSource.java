package byre.admin;

import java.util.List;

/** Supplies the open alerts to {@code GET /status}; the rule engine plugs one in. Called on an HTTP thread. */
@FunctionalInterface
public interface AlertSource {
    List<OpenAlert> openAlerts();

    AlertSource NONE = List::of;
}
