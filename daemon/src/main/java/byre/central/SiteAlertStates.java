package byre.central;

import static byre.central.AlertStateMessage.clip;

import byre.alerts.OpenIncident;
import byre.log.RateLimitedLog;
import io.micrometer.core.instrument.Counter;
import io.micrometer.core.instrument.MeterRegistry;
import java.sql.SQLException;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The sites' alert states ({@code <prefix>/<site>/alerts/<watch>/<zone>}, retained) at the centre: each corrects the
 * centre's view of that site's open incidents ({@link SiteEventLog#apply}), so a centre that started after a site raised
 * an alert, or lost its history, still shows it, and one whose events missed a clear stops showing it. A state that
 * arrives before its site is known (a site found on the broker whose bridge sent the states before its status) is held
 * until the site joins, a bounded number of them.
 */
final class SiteAlertStates {
    private static final Logger LOG = LoggerFactory.getLogger(CentralConsumer.class);
    /** States held for sites not known yet: a few per site for the sites of one bridge reconnecting at once. */
    static final int MAX_HELD = 1000;

    private final String under;
    private final SiteEventLog events;
    private final RateLimitedLog warnings;
    private final Counter added;
    private final Counter removed;
    private final Counter unchanged;
    private final Counter rejected;
    private final Counter dropped;
    /** The states of sites not known yet by topic, in arrival order. */
    private final Map<String, AlertStateMessage> held = new LinkedHashMap<>();

    SiteAlertStates(String under, SiteEventLog events, RateLimitedLog warnings, MeterRegistry registry) {
        this.under = under;
        this.events = events;
        this.warnings = warnings;
        String d = "Sites' retained alert states received by the centre, by what they changed in its view of open alerts";
        added = Counter.builder("byre.central.alert.states").tag("result", "added").description(d).register(registry);
        removed = Counter.builder("byre.central.alert.states").tag("result", "removed").description(d).register(registry);
        unchanged = Counter.builder("byre.central.alert.states").tag("result", "unchanged").description(d).register(registry);
        rejected = Counter.builder("byre.central.alert.states").tag("result", "rejected").description(d).register(registry);
        dropped = Counter.builder("byre.central.alert.states").tag("result", "dropped").description(d).register(registry);
    }

    /** A state of a known site: read, then applied; a malformed one is logged (once a minute per site) and counted. */
    void accept(String site, String topic, byte[] payload) {
        AlertStateMessage m = read(site, topic, payload);
        if (m != null) apply(m);
    }

    /**
     * A state of a site not known yet (with {@code central.discover}): read now, applied if the site joins. An emptied
     * slot only lets go of what was held for it.
     */
    void hold(String site, String topic, byte[] payload) {
        AlertStateMessage m = read(site, topic, payload);
        if (m == null) return;
        synchronized (this) {
            held.remove(topic); // a newer state goes to the end, after those it follows
            if (m.event() == null) return;
            if (held.size() >= MAX_HELD) {
                dropped.increment();
                warnings.warn("alert-state:held", "site " + site + ": alert state of " + clip(m.watch()) + " in " + clip(m.zone()) + " dropped: "
                        + MAX_HELD + " states of sites not known yet are held already; the centre takes it at its next subscription");
                return;
            }
            held.put(topic, m);
        }
    }

    /** Applies the states held for a site that has joined. */
    void joined(String site) {
        List<AlertStateMessage> due = new ArrayList<>();
        synchronized (this) {
            for (var it = held.values().iterator(); it.hasNext(); ) {
                AlertStateMessage m = it.next();
                if (!m.site().equals(site)) continue;
                due.add(m);
                it.remove();
            }
        }
        due.forEach(this::apply);
    }

    /** Lets go of the states held for a site that was refused. */
    synchronized void refused(String site) {
        held.values().removeIf(m -> m.site().equals(site));
    }

    private AlertStateMessage read(String site, String topic, byte[] payload) {
        try {
            return AlertStateMessage.read(under, topic, payload);
        } catch (RuntimeException ex) {
            rejected.increment();
            String where = topic.startsWith(under) ? topic.substring(under.length()) : topic;
            warnings.warn("alert-state:" + site, "site " + clip(site) + ": alert state on " + clip(where)
                    + " ignored: " + text(ex));
            return null;
        }
    }

    private void apply(AlertStateMessage m) {
        String site = m.site();
        SiteEventLog.StateChange c;
        try {
            c = events.apply(m);
        } catch (SQLException ex) {
            // Not applied: the broker sends the state again at the centre's next subscription (a reconnect or restart).
            rejected.increment();
            warnings.warn("alert-state-db", "site " + site + ": alert state of " + clip(m.watch()) + " in " + clip(m.zone())
                    + " not applied, the central history cannot be read (" + ex.getMessage() + ")");
            return;
        }
        if (c.none()) unchanged.increment();
        for (OpenIncident i : c.added()) {
            added.increment();
            LOG.info("site {}: open alert {} in {} ({}) known from its alert state", site, clip(i.watch()), clip(i.zone()), clip(i.id()));
        }
        for (OpenIncident i : c.removed()) {
            removed.increment();
            LOG.info("site {}: alert {} in {} ({}) ended, by its alert state", site, clip(i.watch()), clip(i.zone()), clip(i.id()));
        }
    }

    synchronized int held() {
        return held.size();
    }

    private static String text(RuntimeException ex) {
        String m = ex.getMessage() == null ? ex.getClass().getSimpleName() : ex.getMessage();
        m = m.replaceAll("\\p{Cntrl}", "?");
        return m.length() > 300 ? m.substring(0, 300) + "…" : m;
    }
}
