package byre.demo;

import java.util.List;

/**
 * The weather and faults of one Larkmoor day, as functions of the hours elapsed since the start
 * of the simulation. The day repeats every 24 hours. With {@link LarkmoorFarm#DEFAULT_START}
 * (12:00 Europe/London) elapsed hour 0 is noon, so the clock times in {@link #timeline()} hold.
 *
 * <p>Everything here is the "true" state of the air; sensor noise and faults of the instruments
 * are added by {@link LarkmoorFarm}.
 */
public final class LarkmoorScenario {
    private LarkmoorScenario() {}

    /** Clock hour (0..24) at elapsed hour 0; the diurnal cycle is drawn against it. */
    public static final double START_CLOCK_HOUR = 12.0;

    /** Cow shed heat: a raised-cosine bump of {@link #HOT_PEAK_RISE_C} from this elapsed hour ... */
    public static final double HOT_FROM_H = 0.5;
    /** ... to this one (peak half way). */
    public static final double HOT_TO_H = 6.5;
    public static final double HOT_PEAK_RISE_C = 7.0;

    /** Cold front over the calf barn: extra cooling window (raised cosine). */
    public static final double FRONT_FROM_H = 9.0;
    public static final double FRONT_TO_H = 19.0;
    public static final double FRONT_DEPTH_C = 4.0;

    /** Night wind through the calf pens, with 45-minute ramps at both ends. */
    public static final double WIND_FROM_H = 10.0;
    public static final double WIND_TO_H = 18.5;
    public static final double WIND_RAMP_H = 0.75;

    /** calf-pen-2's air-speed sensor publishes nothing in [from, to). */
    public static final double SILENT_FROM_H = 5.5;
    public static final double SILENT_TO_H = 6.0;
    public static final String SILENT_SENSOR = "pen2-air";

    /** calf-pen-1's wet-bulb wick dries out over [from, dry] and is re-wetted at {@link #WICK_REWET_H}. */
    public static final double WICK_DRYING_FROM_H = 0.25;
    public static final double WICK_DRY_AT_H = 2.75;
    public static final double WICK_REWET_H = 7.0;
    public static final String WICK_SENSOR = "pen1-wet";
    /** Depression a fully dry wick still shows (the bulb is not quite at air temperature). */
    public static final double DRY_WICK_DEPRESSION_C = 0.08;

    /** Human-readable timeline, elapsed hours and the clock times they have with the default start. */
    public static List<String> timeline() {
        return List.of(
                "+0:15-2:45 (12:15-14:45)   calf-pen-1 wet-bulb wick dries out; the wet bulb creeps up to the dry bulb",
                "+0:30-6:30 (12:30-18:30)   hot humid afternoon in the cow shed (RH about 72 %): NRC THI at or above 72"
                        + " from about 14:00 to 16:45, peak about 77 near 15:30",
                "+2:30-7:00 (14:30-19:00)   calf-pen-1 depression (dry minus wet bulb) below 0.3 C; apparent RH near 100 %",
                "+5:30-6:00 (17:30-18:00)   calf-pen-2 air-speed sensor (pen2-air) publishes nothing",
                "+7:00      (19:00)         calf-pen-1 wick re-wetted; its wet bulb reads true again",
                "+10:20-18:10 (22:20-06:10) wind through the calf pens above 1 m/s, about 2 m/s (gusts to 3) from 23:00 to 05:30",
                "+11:50-17:00 (23:50-05:00) calf pens at 2.5-6 C (coldest about 02:30); NWS/MSC wind chill below 5 C"
                        + " from about 23:45 to 05:15 in calf-pen-1 and 00:00 to 04:45 in calf-pen-2, lowest about 0 C",
                "+20:00     (08:00)         calf pens calm and above 7 C again",
                "+24:00     (12:00 next day) the day repeats with fresh noise");
    }

    /** The state of the air in one zone. */
    public record Climate(double dryBulbC, double rhPct, double airSpeedMS) {}

    static final int STREAM_OUT_T = 1, STREAM_OUT_RH = 2, STREAM_WIND = 3, STREAM_PEN2_T = 4,
            STREAM_SHED_T = 5, STREAM_SHED_RH = 6, STREAM_SHED_AIR = 7;

    /** True climate of {@code zone} at {@code hours} elapsed; null for an unknown zone. */
    static Climate climate(long seed, String zone, double hours) {
        double x = dayHour(hours);
        double clock = START_CLOCK_HOUR + x;
        double diurnal = Math.cos(2 * Math.PI * (clock - 15.0) / 24.0); // +1 at 15:00, -1 at 03:00
        double front = FRONT_DEPTH_C * bump(x, FRONT_FROM_H, FRONT_TO_H);
        double outsideC = 11.0 + 6.0 * diurnal - front + Noise.wander(seed, STREAM_OUT_T, hours, 0.4);
        double outsideRh = clamp(75.0 - 15.0 * diurnal + Noise.wander(seed, STREAM_OUT_RH, hours, 3.0), 20, 97);
        double wind = 0.25 + 0.1 * Noise.wander(seed, STREAM_WIND, hours, 1.0)
                + window(x) * (2.0 + Noise.wander(seed, STREAM_WIND + 100, hours * 3, 0.4));
        switch (zone) {
            case "calf-pen-1":
                return new Climate(outsideC + 1.5, clamp(outsideRh - 3, 20, 97), Math.max(0, wind));
            case "calf-pen-2":
                return new Climate(outsideC + 2.0 + Noise.wander(seed, STREAM_PEN2_T, hours, 0.2),
                        clamp(outsideRh - 4, 20, 97), Math.max(0, 0.85 * wind));
            case "cow-shed": {
                double heat = bump(x, HOT_FROM_H, HOT_TO_H);
                double t = 14.0 + 6.0 * diurnal - 0.5 * front + HOT_PEAK_RISE_C * heat
                        + Noise.wander(seed, STREAM_SHED_T, hours, 0.3);
                double rh = clamp(76.0 - 4.0 * heat + Noise.wander(seed, STREAM_SHED_RH, hours, 1.5), 20, 97);
                double air = 0.4 + 1.4 * heat + Noise.wander(seed, STREAM_SHED_AIR, hours, 0.1);
                return new Climate(t, rh, Math.max(0, air));
            }
            default:
                return null;
        }
    }

    /** How dry calf-pen-1's wick is: 0 wet, 1 dry. */
    static double wickDryness(double hours) {
        double x = dayHour(hours);
        if (x < WICK_DRYING_FROM_H || x >= WICK_REWET_H) return 0;
        if (x >= WICK_DRY_AT_H) return 1;
        return smoothstep((x - WICK_DRYING_FROM_H) / (WICK_DRY_AT_H - WICK_DRYING_FROM_H));
    }

    static boolean silent(String sensorId, double hours) {
        double x = dayHour(hours);
        return sensorId.equals(SILENT_SENSOR) && x >= SILENT_FROM_H && x < SILENT_TO_H;
    }

    static double dayHour(double hours) {
        double x = hours % 24.0;
        return x < 0 ? x + 24.0 : x;
    }

    /** Raised cosine: 0 outside [from, to], 1 half way. */
    static double bump(double x, double from, double to) {
        if (x <= from || x >= to) return 0;
        return (1 - Math.cos(2 * Math.PI * (x - from) / (to - from))) / 2;
    }

    /** Night-wind envelope: 0 outside, smooth ramps, 1 in the middle. */
    static double window(double x) {
        if (x <= WIND_FROM_H || x >= WIND_TO_H) return 0;
        double up = (x - WIND_FROM_H) / WIND_RAMP_H;
        double down = (WIND_TO_H - x) / WIND_RAMP_H;
        return smoothstep(Math.min(1, Math.min(up, down)));
    }

    static double smoothstep(double u) {
        double v = clamp(u, 0, 1);
        return v * v * (3 - 2 * v);
    }

    static double clamp(double v, double lo, double hi) { return Math.max(lo, Math.min(hi, v)); }
}
