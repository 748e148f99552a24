package byre.daemon;

import byre.alerts.AlertEvent;
import byre.alerts.AlertPolicy;
import byre.alerts.EventKind;
import byre.alerts.NightDigest;
import byre.alerts.WatchOutcome;
import byre.mqtt.MqttLink;
import byre.notify.AlertService;
import byre.rules.Watch;
import byre.rules.eval.Transition;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneId;
import java.time.format.DateTimeFormatter;
import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.Deque;
import java.util.List;
import java.util.Locale;
import java.util.function.Consumer;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Hands the watches' transitions to the alert service (incidents, outbox, channels), logs them,
 * publishes each watch instance's current state retained under
 * {@code <prefix>/<site>/alerts/<watch>/<zone>} (README, How data flows), and remembers the episodes of
 * the last two days for the morning digest.
 */
final class AlertStage implements WatchStage.Outcomes {
    private static final Logger LOG = LoggerFactory.getLogger("byre.alerts");
    private static final DateTimeFormatter CLOCK = DateTimeFormatter.ofPattern("EEE HH:mm", Locale.ROOT);

    private final AlertService alerts;
    private final MqttLink link;
    private final String base;
    private final ZoneId zone;
    private final Consumer<String> console;
    private final Deque<NightDigest.IncidentSpan> episodes = new ArrayDeque<>();
    /** Every 4 to 5 s: reminders and escalations come within 5 s of their time, as they always did. */
    private final Cadence ticks = new Cadence(java.time.Duration.ofSeconds(4), java.time.Duration.ofSeconds(1), java.time.Duration.ofSeconds(60));

    private final io.micrometer.core.instrument.MeterRegistry registry;

    AlertStage(AlertService alerts, MqttLink link, String prefix, String site, ZoneId zone, Consumer<String> console,
             io.micrometer.core.instrument.MeterRegistry registry) {
        this.registry = registry;
        this.alerts = alerts;
        this.link = link;
        this.base = prefix + "/" + site + "/alerts/";
        this.zone = zone;
        this.console = console;
        alerts.onEvent(this::told);
    }

    /** The log and the console show each event's message: the very text its channels get. */
    private void told(AlertEvent e) {
        String text = e.message() == null ? e.headline() : e.message();
        if (e.kind() == EventKind.RAISED || e.kind() == EventKind.ESCALATED) LOG.warn("{}", text);
        else LOG.info("{}", text);
        if (console != null && e.at() != null) console.accept(CLOCK.format(e.at().atZone(zone)) + "  " + text);
    }

    @Override
    public void transition(Transition t, Watch watch) {
        remember(t);
        AlertPolicy policy = watch == null ? new AlertPolicy(List.of(), null, null, List.of())
                : new AlertPolicy(watch.notifyChannels(), watch.remindEvery().orElse(null), watch.escalateAfter().orElse(null),
                        watch.escalateTo());
        WatchOutcome outcome = new WatchOutcome(t.kind() == Transition.Kind.RAISED ? WatchOutcome.Kind.RAISED : WatchOutcome.Kind.CLEARED,
                t.watch(), t.zone(), t.level().id(), t.quantity(), t.value(), t.unit(), t.since(), t.at(), t.message(), policy);
        registry.counter("byre.watch.transitions", "kind", t.kind().event()).increment();
        for (AlertEvent e : alerts.accept(outcome)) {
            if (e.watch() != null && e.zone() != null) link.publish(base + e.watch() + "/" + e.zone(), e.toJson(), 1, true);
        }
    }

    @Override
    public void tick(Instant now) {
        if (!ticks.due(now)) return;
        alerts.tick();
    }

    /** Reminders, escalations, the digest and failing channels are looked at every 4 to 5 s. */
    @Override
    public Instant nextTick(Instant now) {
        return ticks.nextAt(now);
    }

    private synchronized void remember(Transition t) {
        if (t.kind() == Transition.Kind.RAISED) {
            episodes.addLast(new NightDigest.IncidentSpan(t.watch(), t.zone(), t.level().id(), t.since(), null));
        } else {
            List<NightDigest.IncidentSpan> copy = new ArrayList<>(episodes);
            episodes.clear();
            for (NightDigest.IncidentSpan s : copy) {
                boolean match = s.end() == null && s.watch().equals(t.watch()) && s.zone().equals(t.zone());
                episodes.addLast(match ? new NightDigest.IncidentSpan(s.watch(), s.zone(), s.level(), s.start(), t.at()) : s);
            }
        }
        Instant horizon = t.at().minus(Duration.ofDays(2));
        while (!episodes.isEmpty() && episodes.peekFirst().end() != null && episodes.peekFirst().end().isBefore(horizon)) {
            episodes.removeFirst();
        }
    }

    /** Episodes that overlap [from, to), for the digest. */
    synchronized List<NightDigest.IncidentSpan> episodes(Instant from, Instant to) {
        return episodes.stream().filter(s -> s.start().isBefore(to) && (s.end() == null || s.end().isAfter(from))).toList();
    }
}
