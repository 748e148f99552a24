package byre.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

import byre.config.ZoneConfig;
import byre.history.HistoryStore;
import byre.history.HistoryWriter;
import byre.history.Retention;
import byre.ingest.Reading;
import byre.rules.CompileResult;
import byre.rules.RuleCompiler;
import byre.rules.RuleSet;
import byre.rules.RuleSource;
import byre.rules.SimpleRuleContext;
import byre.rules.Watch;
import byre.rules.ZoneReading;
import byre.rules.eval.Transition;
import byre.testing.ManualTicker;
import byre.testing.MutableClock;
import byre.units.Quantity;
import byre.zones.ClimateDeriver;
import byre.zones.ZoneStage;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneId;
import java.time.ZoneOffset;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The pipeline ticks its stages only when one of them is due, not four times a second, and every deadline is still met
 * to the millisecond. The pipeline's thread is not started: the test turns it, each time with the clock set to the
 * earliest tick the stages asked for, as the thread wakes then. A hold raises when it ends, a sensor gone quiet raises
 * at its max-age, a put-off derivation comes within 250 ms of a second after the last one, and an hour without
 * readings takes one turn a minute.
 */
class PipelineDeadlinesTest {
    static final Instant T0 = Instant.parse("2026-07-14T10:00:00Z");
    static final String RULES = """
            watch hot
              raise when cows.dry-bulb >= 30 for 2m
              clear when cows.dry-bulb <= 28 for 1m
              notify office
            watch quiet
              raise when silent(cows.dry-bulb)
              notify office
            """;

    @TempDir
    Path dir;

    final MutableClock clock = new MutableClock(T0);
    final List<String> events = new ArrayList<>();
    /** Each zone reading the stages got, with the clock's time then. */
    final List<String> seen = new ArrayList<>();
    HistoryStore store;
    HistoryWriter writer;

    @AfterEach
    void close() {
        if (writer != null) writer.close();
        if (store != null) store.close();
    }

    static RuleSet compile(String text) {
        SimpleRuleContext ctx = new SimpleRuleContext().site("larkmoor").zone("cows", "cattle").channel("office")
                .defaultMaxAge(Duration.ofMinutes(5));
        CompileResult r = RuleCompiler.compile(List.of(new RuleSource("t.rules", text)), ctx);
        assertFalse(r.hasErrors(), r::render);
        return r.ruleSet().orElseThrow();
    }

    static ZoneStage zones() {
        return new ZoneStage(List.of(new ZoneConfig("cows", List.of("cattle"), List.of("shed-dry", "shed-wet"), Double.NaN,
                ZoneConfig.Psychrometer.ASPIRATED, Duration.ofMinutes(5), "nrc-1971", 1)), new ClimateDeriver(), ZoneStage.Observer.NONE);
    }

    Pipeline pipeline(Clock c) {
        store = HistoryStore.open(dir.resolve("history.db"), c);
        writer = HistoryWriter.start(store, Retention.DEFAULT, c);
        return new Pipeline(zones(), writer, c, new ManualTicker());
    }

    Pipeline withWatches() {
        Pipeline p = pipeline(clock);
        p.addListener(new WatchStage(compile(RULES), store, ZoneId.of("UTC"), new WatchStage.Outcomes() {
            @Override
            public void transition(Transition t, Watch watch) {
                // The transition's own time, and when the pipeline's tick brought it: the engine dates a raise from its
                // timer even when ticked late, so only the second shows the tick came on time.
                events.add(t.kind() + " " + t.watch() + " " + t.at() + (t.at().equals(clock.instant()) ? "" : " ticked at " + clock.instant()));
            }
        }, T0));
        p.addListener(r -> seen.add(r.quantity().id() + " at " + clock.instant()));
        return p;
    }

    /** Turns the pipeline at every tick it asks for up to {@code until}, the clock set to each; returns the turns. */
    int runUntil(Pipeline p, Instant until) {
        int turns = 0;
        while (true) {
            Instant next = p.nextTick();
            if (next == null || next.isAfter(until)) break;
            if (next.isAfter(clock.instant())) clock.set(next);
            p.turn();
            if (++turns > 100_000) fail("the pipeline keeps asking for a tick at " + next);
        }
        clock.set(until);
        return turns;
    }

    void offer(Pipeline p, String sensor, Quantity q, double value, Instant at) {
        runUntil(p, at);
        p.offer(new Reading(sensor, q, value, at));
        p.turn(); // the reading woke the thread
    }

    @Test
    void holdsSilenceAndPutOffDerivationsComeExactlyWhenDue() {
        Pipeline p = withWatches();
        p.turn(); // the first turn ticks everything
        offer(p, "shed-dry", Quantity.DRY_BULB, 31.0, T0.plusSeconds(10));
        offer(p, "shed-wet", Quantity.WET_BULB, 25.0, T0.plusMillis(10_500));
        assertEquals(T0.plusMillis(11_250), p.nextTick(),
                "the wet bulb's derivation is put off until a second after the last one; the thread wakes for it within 250 ms");
        seen.clear();
        runUntil(p, T0.plusMillis(11_250));
        assertTrue(seen.contains("thi at " + T0.plusMillis(11_250)), "derived at that tick: " + seen);
        offer(p, "shed-wet", Quantity.WET_BULB, 25.1, T0.plusMillis(11_400));
        assertEquals(T0.plusMillis(11_750), p.nextTick(), "a second after the reading time of the last derivation (10.5 s), plus 250 ms");

        runUntil(p, T0.plus(Duration.ofMinutes(10)));
        assertEquals(List.of("RAISED hot " + T0.plusSeconds(130), "RAISED quiet " + T0.plusSeconds(310)), events,
                "the hold of 2 minutes from 10:00:10, and the dry bulb silent 5 minutes (its max-age) after its last reading");
    }

    /** In a stream of readings the stages are asked at most every 100 ms; a hold begun in between is still met exactly. */
    @Test
    void aHoldBegunWithinABurstIsMetExactly() {
        Pipeline p = withWatches();
        p.turn();
        offer(p, "shed-dry", Quantity.DRY_BULB, 20.0, T0.plusSeconds(10));
        offer(p, "shed-dry", Quantity.DRY_BULB, 31.0, T0.plusMillis(10_020));
        assertEquals(T0.plusMillis(10_100), p.nextTick(), "20 ms after the last tick: the stages are asked 100 ms after it");
        runUntil(p, T0.plus(Duration.ofMinutes(3)));
        assertEquals(List.of("RAISED hot " + T0.plusMillis(130_020)), events);
    }

    @Test
    void anHourWithoutReadingsTakesATurnAMinute() {
        Pipeline p = withWatches();
        p.turn();
        offer(p, "shed-dry", Quantity.DRY_BULB, 20.0, T0.plusSeconds(10));
        runUntil(p, T0.plus(Duration.ofMinutes(10)));
        assertEquals(List.of("RAISED quiet " + T0.plusSeconds(310)), events);
        long before = p.turns();
        runUntil(p, T0.plus(Duration.ofMinutes(70)));
        long turns = p.turns() - before;
        assertTrue(turns >= 55 && turns <= 61, "the engine is told the time once a minute; four ticks a second were 14,400: " + turns);
    }

    @Test
    void restsUntilTheNextTickOnlyWithTheMachinesClock() {
        assertTrue(Pipeline.isMachineClock(Clock.systemUTC()));
        assertTrue(Pipeline.isMachineClock(Clock.system(ZoneId.of("Europe/London"))));
        assertFalse(Pipeline.isMachineClock(clock), "a test's clock moves only when told");
        assertFalse(Pipeline.isMachineClock(Clock.offset(Clock.systemUTC(), Duration.ofHours(1))));
        assertFalse(Pipeline.isMachineClock(Clock.fixed(T0, ZoneOffset.UTC)));

        Pipeline machine = pipeline(Clock.systemUTC());
        java.util.concurrent.atomic.AtomicReference<Instant> asked = new java.util.concurrent.atomic.AtomicReference<>();
        machine.addListener(new Pipeline.ZoneListener() {
            @Override
            public void accept(ZoneReading r) {}

            @Override
            public Instant nextTick(Instant now) {
                return asked.get();
            }
        });
        machine.turn();
        assertEquals(Pipeline.MAX_REST_MILLIS, machine.restMillis(T0), "nothing asked for: the longest rest");
        asked.set(T0.plusSeconds(3));
        machine.wake(); // the stages are asked again at the next turn
        machine.turn();
        assertEquals(3000, machine.restMillis(T0));
        assertEquals(1, machine.restMillis(T0.plusMillis(2999).plusNanos(500_000)), "rounded up: never wakes before it is due");
        assertEquals(Pipeline.MAX_REST_MILLIS, machine.restMillis(T0.minusSeconds(60)), "at most the longest rest");
    }

    @Test
    void withAnyOtherClockItLooksFourTimesASecond() {
        Pipeline p = withWatches();
        p.turn();
        assertEquals(Pipeline.OTHER_CLOCK_REST_MILLIS, p.restMillis(T0), "a hold of the demo's faster clock must not wait in real time");
    }
}
