package byre.daemon;

import byre.alerts.AlertEvent;
import byre.alerts.AlertPolicy;
import byre.alerts.IdSource;
import byre.alerts.AckLinks;
import byre.alerts.EventText;
import byre.alerts.IncidentBook;
import byre.alerts.WatchOutcome;
import byre.config.ZoneConfig;
import byre.ingest.Reading;
import byre.rules.RuleSet;
import byre.rules.Watch;
import byre.rules.ZoneReading;
import byre.rules.eval.Transition;
import byre.rules.eval.WatchEngine;
import byre.zones.ZoneDeriver;
import byre.zones.ZoneStage;
import java.time.Instant;
import java.time.ZoneId;
import java.util.ArrayList;
import java.util.List;

/**
 * The watches and the incident book run over recorded readings instead of a live broker: the same
 * engine, zone derivation and incident logic as the daemon, with time taken from the readings. Time
 * between readings advances in one-second steps, as the live daemon's ticks do.
 */
public final class Replay {
    private final WatchEngine engine;
    private final IncidentBook book;
    private final ZoneStage zones;
    private final NoDataReport noData;
    private Instant now;
    private Instant first;

    public Replay(RuleSet rules, ZoneId siteZone, String site, List<ZoneConfig> zoneConfigs, ZoneDeriver deriver) {
        this(rules, siteZone, site, zoneConfigs, deriver, false);
    }

    /** @param usUnits word values in F and mph, as the live daemon does for {@code units: us} */
    public Replay(RuleSet rules, ZoneId siteZone, String site, List<ZoneConfig> zoneConfigs, ZoneDeriver deriver, boolean usUnits) {
        this.engine = new WatchEngine(rules, siteZone, new WatchEngine.Options(null, usUnits));
        this.book = new IncidentBook(site, IdSource.counting(), new EventText(site, usUnits, AckLinks.NONE));
        this.noData = new NoDataReport(rules);
        this.zones = zoneConfigs == null ? null : new ZoneStage(zoneConfigs, deriver, ZoneStage.Observer.NONE);
    }

    /** A zone-level reading straight into the watches. */
    public List<AlertEvent> zoneReading(ZoneReading r) {
        List<AlertEvent> out = advanceTo(r.at());
        feed(r, out);
        return out;
    }

    /** A raw sensor reading through zone derivation, then into the watches. */
    public List<AlertEvent> sensorReading(Reading r) {
        if (zones == null) throw new IllegalStateException("sensor readings need the configuration's zones");
        List<AlertEvent> out = advanceTo(r.at());
        zones.accept(r, zr -> feed(zr, out));
        return out;
    }

    /** Lets time pass up to {@code t}: hold timers, silence, reminders and escalations due by then. */
    public List<AlertEvent> advanceTo(Instant t) {
        List<AlertEvent> out = new ArrayList<>();
        if (now == null) {
            now = t;
            first = t;
        }
        while (now.isBefore(t)) {
            now = now.plusSeconds(1).isAfter(t) ? t : now.plusSeconds(1);
            if (zones != null) zones.derivePending(now, zr -> feed(zr, out));
            handle(engine.tick(now), out);
            out.addAll(book.tick(now));
        }
        return out;
    }

    private void feed(ZoneReading zr, List<AlertEvent> out) {
        noData.reading(zr.zone(), zr.quantity(), zr.at());
        handle(engine.accept(zr), out);
    }

    /**
     * Per watch, the share of the replayed time (first reading to {@code end}) during which one of its terms
     * had no data, with the stream that lacked it most: one line each, for the operator.
     */
    public List<String> noDataLines(Instant end) {
        List<String> out = new ArrayList<>();
        if (first == null || end == null) return out;
        for (NoDataReport.Line l : noData.lines(first, end)) out.add(l.text());
        return out;
    }

    private void handle(List<Transition> transitions, List<AlertEvent> out) {
        for (Transition t : transitions) {
            Watch w = engine.rules().watch(t.watch()).orElse(null);
            AlertPolicy policy = w == null ? new AlertPolicy(List.of(), null, null, List.of())
                    : new AlertPolicy(w.notifyChannels(), w.remindEvery().orElse(null), w.escalateAfter().orElse(null), w.escalateTo());
            out.addAll(book.accept(new WatchOutcome(
                    t.kind() == Transition.Kind.RAISED ? WatchOutcome.Kind.RAISED : WatchOutcome.Kind.CLEARED, t.watch(), t.zone(),
                    t.level().id(), t.quantity(), t.value(), t.unit(), t.since(), t.at(), t.message(), policy)));
        }
    }
}
