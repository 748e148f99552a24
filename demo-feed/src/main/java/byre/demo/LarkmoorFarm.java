package byre.demo;

import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

/**
 * Seeded, deterministic simulator of the invented Larkmoor farm: two calf pens in the calf barn
 * (dry bulb, wet bulb and air speed each; aspirated psychrometers) and a cow shed (dry bulb, a
 * SenML RH module and a JSON air-speed probe). Each sensor publishes one reading per reporting
 * interval, staggered within the interval. The same seed, start and interval always give exactly
 * the same messages. The weather and the faults are described in {@link LarkmoorScenario}.
 */
public final class LarkmoorFarm implements FeedSource {

    /** 2026-05-12 12:00 Europe/London (BST): with this start the scenario's clock times hold. */
    public static final Instant DEFAULT_START = Instant.parse("2026-05-12T11:00:00Z");
    public static final Duration DEFAULT_INTERVAL = Duration.ofMinutes(1);
    /** Larkmoor's elevation, as in the demo configuration; sets the psychrometer's pressure. */
    public static final double ELEVATION_M = 180.0;

    private static final List<SimSensor> SENSORS = List.of(
            new SimSensor("pen1-dry", "calf-pen-1", "larkmoor/calf-barn/pen1/dry", "dry-bulb", "C", "number"),
            new SimSensor("pen1-wet", "calf-pen-1", "larkmoor/calf-barn/pen1/wet", "wet-bulb", "C", "number"),
            new SimSensor("pen1-air", "calf-pen-1", "larkmoor/calf-barn/pen1/air", "air-speed", "m/s", "number"),
            new SimSensor("pen2-dry", "calf-pen-2", "larkmoor/calf-barn/pen2/dry", "dry-bulb", "F", "number"),
            new SimSensor("pen2-wet", "calf-pen-2", "larkmoor/calf-barn/pen2/wet", "wet-bulb", "F", "number"),
            new SimSensor("pen2-air", "calf-pen-2", "larkmoor/calf-barn/pen2/air", "air-speed", "ft/min", "json:speed"),
            new SimSensor("shed-dry", "cow-shed", "larkmoor/cow-shed/dry", "dry-bulb", "C", "number"),
            new SimSensor("shed-rh", "cow-shed", "larkmoor/cow-shed/climate", "rh", "%", "senml:rh"),
            new SimSensor("shed-air", "cow-shed", "larkmoor/cow-shed/air", "air-speed", "m/s", "json:air.speed"));

    private static final double FEET_PER_METRE = 1 / 0.3048;

    private final long seed;
    private final Instant simStart;
    private final Duration interval;
    private final long[] offsetsMillis;
    private final double pressureKPa = Psychrometer.stationPressureKPa(ELEVATION_M);
    private long tick;

    public LarkmoorFarm(long seed) { this(seed, DEFAULT_START, DEFAULT_INTERVAL); }

    public LarkmoorFarm(long seed, Instant simStart) { this(seed, simStart, DEFAULT_INTERVAL); }

    /**
     * @param interval reporting interval of every sensor, 1 s to 1 h
     * @throws IllegalArgumentException for a null start or an interval outside 1 s .. 1 h
     */
    public LarkmoorFarm(long seed, Instant simStart, Duration interval) {
        if (simStart == null) throw new IllegalArgumentException("simulation start is missing");
        if (interval == null || interval.compareTo(Duration.ofSeconds(1)) < 0 || interval.compareTo(Duration.ofHours(1)) > 0) {
            throw new IllegalArgumentException("reporting interval must be between 1s and 1h, got " + interval);
        }
        this.seed = seed;
        this.simStart = simStart;
        this.interval = interval;
        this.offsetsMillis = new long[SENSORS.size()];
        long ms = interval.toMillis();
        for (int i = 0; i < SENSORS.size(); i++) {
            long off = ms * i / SENSORS.size();
            // whole seconds when the interval allows it, so that JSON and SenML times are integers
            offsetsMillis[i] = ms >= 1000L * SENSORS.size() ? off / 1000 * 1000 : off;
        }
    }

    /** Every simulated sensor, in publishing order within an interval. */
    public static List<SimSensor> sensors() { return SENSORS; }

    public long seed() { return seed; }

    public Instant simStart() { return simStart; }

    public Duration interval() { return interval; }

    @Override
    public Instant simTime() { return simStart.plus(interval.multipliedBy(tick)); }

    @Override
    public List<FeedMessage> step() {
        Instant base = simTime();
        List<FeedMessage> out = new ArrayList<>(SENSORS.size());
        for (int i = 0; i < SENSORS.size(); i++) {
            Instant at = base.plusMillis(offsetsMillis[i]);
            FeedMessage m = reading(i, at, tick);
            if (m != null) out.add(m);
        }
        tick++;
        return out;
    }

    /** All messages from {@link #simTime()} for {@code span} of simulated time (whole steps). */
    public List<FeedMessage> run(Duration span) {
        Instant end = simTime().plus(span);
        List<FeedMessage> out = new ArrayList<>();
        while (simTime().isBefore(end)) out.addAll(step());
        return out;
    }

    /** The true air of a zone at an instant, before sensor noise and faults (null for an unknown zone). */
    public LarkmoorScenario.Climate climateAt(String zone, Instant at) {
        return LarkmoorScenario.climate(seed, zone, hoursSinceStart(at));
    }

    private double hoursSinceStart(Instant at) {
        return Duration.between(simStart, at).toMillis() / 3_600_000.0;
    }

    private FeedMessage reading(int index, Instant at, long n) {
        SimSensor s = SENSORS.get(index);
        double h = hoursSinceStart(at);
        if (LarkmoorScenario.silent(s.id(), h)) return null;
        LarkmoorScenario.Climate c = LarkmoorScenario.climate(seed, s.zone(), h);
        long stream = 100 + index;
        double z = Noise.gaussian(seed, stream, n);
        long epochSecond = at.getEpochSecond();
        switch (s.id()) {
            case "pen1-dry":
                return num(s, at, c.dryBulbC() + 0.05 * z, 2);
            case "pen1-wet": {
                double trueDepression = c.dryBulbC() - Psychrometer.wetBulbC(c.dryBulbC(), c.rhPct(), pressureKPa);
                double dry = LarkmoorScenario.wickDryness(h);
                double depression = trueDepression * (1 - dry) + LarkmoorScenario.DRY_WICK_DEPRESSION_C * dry;
                return num(s, at, c.dryBulbC() - depression + 0.03 * z, 2);
            }
            case "pen1-air":
                return num(s, at, gusty(c.airSpeedMS(), z), 2);
            case "pen2-dry":
                return num(s, at, toF(c.dryBulbC() + 0.05 * z), 2);
            case "pen2-wet":
                return num(s, at, toF(Psychrometer.wetBulbC(c.dryBulbC(), c.rhPct(), pressureKPa) + 0.03 * z), 2);
            case "pen2-air": {
                double ftPerMin = gusty(c.airSpeedMS(), z) * FEET_PER_METRE * 60;
                return FeedMessage.text(s.topic(), "{\"speed\":" + fmt(ftPerMin, 1) + ",\"ts\":" + epochSecond + "}", at);
            }
            case "shed-dry":
                return num(s, at, c.dryBulbC() + 0.05 * z, 2);
            case "shed-rh": {
                // An RH module that reports its own temperature too; byre picks the "rh" record.
                double moduleC = c.dryBulbC() + 0.3 + 0.05 * Noise.gaussian(seed, stream + 50, n);
                double rh = LarkmoorScenario.clamp(c.rhPct() + 0.4 * z, 0, 100);
                String senml = "[{\"bn\":\"larkmoor/cow-shed/\",\"bt\":" + epochSecond
                        + ",\"n\":\"temp\",\"u\":\"Cel\",\"v\":" + fmt(moduleC, 2)
                        + "},{\"n\":\"rh\",\"u\":\"%RH\",\"v\":" + fmt(rh, 1) + "}]";
                return FeedMessage.text(s.topic(), senml, at);
            }
            case "shed-air":
                return FeedMessage.text(s.topic(), "{\"air\":{\"speed\":" + fmt(gusty(c.airSpeedMS(), z), 2)
                        + "},\"ts\":" + epochSecond + "}", at);
            default:
                throw new IllegalStateException("no reading defined for " + s.id());
        }
    }

    /** Gusts grow with the mean wind; never negative. */
    private static double gusty(double meanMS, double z) {
        return Math.max(0, meanMS + (0.03 + 0.1 * meanMS) * z);
    }

    private static double toF(double c) { return c * 9.0 / 5.0 + 32.0; }

    private static FeedMessage num(SimSensor s, Instant at, double value, int decimals) {
        return FeedMessage.text(s.topic(), fmt(value, decimals), at);
    }

    static String fmt(double v, int decimals) {
        String s = String.format(Locale.ROOT, "%." + decimals + "f", v);
        return s.startsWith("-") && Double.parseDouble(s) == 0 ? s.substring(1) : s;
    }
}
