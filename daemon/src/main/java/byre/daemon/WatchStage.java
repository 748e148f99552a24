package byre.daemon;

import byre.history.HistoryReader;
import byre.history.HistoryStore;
import byre.history.StreamKey;
import byre.rules.RuleSet;
import byre.rules.Watch;
import byre.rules.ZoneReading;
import byre.rules.eval.Transition;
import byre.rules.eval.WatchEngine;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneId;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The rule stage of the live daemon: feeds zone streams and the passing of time to the watch
 * engine, hands its transitions to the alert stage, and keeps the engine's state in the history
 * database so that a restart neither forgets a raised alert nor repeats its {@code raised}.
 * Runs on the pipeline thread only.
 */
public final class WatchStage implements Pipeline.ZoneListener {
    private static final Logger LOG = LoggerFactory.getLogger(WatchStage.class);
    static final String STATE_KEY = "rules.snapshot";
    /** How far back windows are refilled from history at start and on reload. */
    static final Duration PRIME_SPAN = Duration.ofHours(25);
    /**
     * The engine is told the time at least this often, hold timers or not: it takes a step of the clock over
     * {@link WatchEngine.Options#live()}'s bound (10 minutes) for a correction of the clock, not for time passing.
     */
    static final Duration TELL_TIME_EVERY = Duration.ofMinutes(1);
    /** Running holds are saved at most this often (a transition is saved at once). */
    static final Duration SAVE_EVERY = Duration.ofSeconds(60);

    /** Receives what the watches decide. */
    public interface Outcomes {
        void transition(Transition t, Watch watch);

        default void tick(Instant now) {}

        /** When {@link #tick} is next needed, as {@link Pipeline.ZoneListener#nextTick}; null for never. */
        default Instant nextTick(Instant now) {
            return null;
        }
    }

    private final HistoryStore store;
    private final ZoneId siteZone;
    private final Outcomes outcomes;
    private final WatchEngine.Options options;
    private WatchEngine engine;
    private Map<String, String> lastSaved = Map.of();
    private Instant lastSave = Instant.MIN;
    private volatile int[] openCounts = new int[byre.rules.eval.AlertState.values().length];

    public WatchStage(RuleSet rules, HistoryStore store, ZoneId siteZone, Outcomes outcomes, Instant now) {
        this(rules, store, siteZone, outcomes, now, false);
    }

    /** @param usUnits messages show {value} in F and mph (configuration {@code units: us}) */
    public WatchStage(RuleSet rules, HistoryStore store, ZoneId siteZone, Outcomes outcomes, Instant now, boolean usUnits) {
        this.store = store;
        this.siteZone = siteZone;
        this.outcomes = outcomes;
        this.options = new WatchEngine.Options(WatchEngine.Options.live().maxClockStep(), usUnits);
        this.engine = build(rules, load(), now, null);
    }

    private WatchEngine build(RuleSet rules, Map<String, String> state, Instant now, WatchEngine previous) {
        WatchEngine e = new WatchEngine(rules, siteZone, options, previous);
        for (String skipped : e.restore(state)) LOG.info("alert state not carried over: {}", skipped);
        prime(e, now);
        return e;
    }

    /** Refills the engine's windows with the stored zone streams of the last day. */
    private void prime(WatchEngine e, Instant now) {
        try (HistoryReader r = store.openReader()) {
            List<StreamKey> zoneKeys = r.streams().stream().filter(k -> k.kind() == StreamKey.Kind.ZONE).toList();
            r.forEachRawInTimeOrder(zoneKeys, now.minus(PRIME_SPAN), now, row -> {
                String zone = row.stream().zone().orElse(null);
                row.stream().quantity().ifPresent(q -> e.prime(new ZoneReading(row.at(), zone, q, row.value())));
            });
        } catch (RuntimeException ex) {
            LOG.warn("could not refill rule windows from history ({}); they fill as readings arrive", ex.getMessage());
        }
    }

    /**
     * Swaps in new rules. A watch whose definition did not change keeps everything: state, running hold
     * timers, windows. One that changed keeps a raised alert raised (its hold restarts); windows of an
     * unchanged function and length carry over, new ones are filled from history.
     */
    public void reload(RuleSet rules, Instant now) {
        Map<String, String> state = engine.snapshot();
        engine = build(rules, state, now, engine);
        save(now, true);
        LOG.info("rules reloaded: {} watches; {} of {} watch instances unchanged, their holds and windows carried over",
                rules.watches().size(), engine.carriedInstances(), engine.instanceCount());
    }

    /** Instances in a state, for the metrics; read on other threads, so a small race is harmless. */
    public int openCount(byre.rules.eval.AlertState state) {
        return openCounts[state.ordinal()];
    }

    public WatchEngine engine() {
        return engine;
    }

    @Override
    public void accept(ZoneReading r) {
        handle(engine.accept(r), r.at());
    }

    @Override
    public void tick(Instant now) {
        handle(engine.tick(now), now);
        outcomes.tick(now);
    }

    /**
     * The earliest of: the engine's next hold timer or silence check, the next look at running holds to save, the
     * alert stage's next turn, and a minute from now (see {@link #TELL_TIME_EVERY}).
     */
    @Override
    public Instant nextTick(Instant now) {
        Instant next = now.plus(TELL_TIME_EVERY);
        next = earlier(next, engine.nextDue());
        next = earlier(next, lastSave.plus(SAVE_EVERY));
        return earlier(next, outcomes.nextTick(now));
    }

    private static Instant earlier(Instant a, Instant b) {
        return b != null && b.isBefore(a) ? b : a;
    }

    private void handle(List<Transition> transitions, Instant now) {
        for (Transition t : transitions) {
            Watch w = engine.rules().watch(t.watch()).orElse(null);
            try {
                outcomes.transition(t, w);
            } catch (RuntimeException e) {
                LOG.error("alert stage failed on {} {} {}: {}", t.kind(), t.watch(), t.zone(), e.toString(), e);
            }
        }
        save(now, !transitions.isEmpty());
    }

    private void countStates() {
        int[] c = new int[byre.rules.eval.AlertState.values().length];
        for (byre.rules.eval.InstanceState i : engine.openInstances()) c[i.state().ordinal()]++;
        openCounts = c;
    }

    /** Stores the state when an alert changed, and at most once a minute for running holds. */
    private void save(Instant now, boolean force) {
        if (!force && now.isBefore(lastSave.plus(SAVE_EVERY)) && !now.isBefore(lastSave)) return;
        lastSave = now; // looked at once a minute whether or not it changed (and retried a minute after a failure)
        countStates();
        Map<String, String> snap = engine.snapshot();
        if (!force && Objects.equals(snap, lastSaved)) return;
        StringBuilder sb = new StringBuilder();
        snap.forEach((k, v) -> sb.append(k).append('\t').append(v).append('\n'));
        try {
            store.putState(STATE_KEY, sb.toString());
            lastSaved = snap;
        } catch (RuntimeException e) {
            LOG.warn("cannot store alert state: {}", e.getMessage());
        }
    }

    private Map<String, String> load() {
        Map<String, String> out = new LinkedHashMap<>();
        String text = store.loadState(STATE_KEY).get(STATE_KEY);
        if (text == null) return out;
        for (String line : text.split("\n")) {
            int tab = line.indexOf('\t');
            if (tab > 0) out.put(line.substring(0, tab), line.substring(tab + 1));
        }
        return out;
    }
}
