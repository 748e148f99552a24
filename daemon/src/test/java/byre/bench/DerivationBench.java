package byre.bench;

import byre.climate.ClimateInputs;
import byre.climate.DerivedClimate;
import byre.climate.Magnus;
import byre.climate.ZoneClimate;
import byre.units.Quantity;
import java.util.Arrays;
import java.util.Locale;

/**
 * Zone derivations per second on one thread (a benchmark, not a test). Prints the rate for two zone
 * shapes and, per round, the ratio against a baseline run in the same process: a loop that computes
 * only the WMO Magnus e_w of the same dry bulbs (one exp per zone). The ratio says how many Magnus
 * evaluations one full derivation costs, which stays comparable across machines when the absolute
 * rate does not. Median of 5 rounds after warm-up.
 *
 * <p>Run: {@code mvn -q -B -o -pl daemon -am test-compile} then
 * {@code java -cp daemon/target/test-classes:daemon/target/classes:rules/target/classes byre.bench.DerivationBench}
 */
public final class DerivationBench {
    private static final int ZONES = 1024;
    private static final int ROUNDS = 5;
    private static double sink;

    public static void main(String[] args) {
        ClimateInputs[] psychrometer = new ClimateInputs[ZONES];
        ClimateInputs[] hygrometer = new ClimateInputs[ZONES];
        double[] dryBulbs = new double[ZONES];
        for (int i = 0; i < ZONES; i++) {
            double t = -10 + 45.0 * i / ZONES;
            dryBulbs[i] = t;
            // Larkmoor calf barn: dry and wet bulb, air speed, globe, elevation
            psychrometer[i] = ClimateInputs.builder().dryBulbC(t).wetBulbC(t - 1 - (i % 7)).airSpeedMps(0.2 + (i % 5) * 0.6)
                    .globeC(t + 1.5).elevationM(240).build();
            // Larkmoor cow shed: capacitive RH sensor, so wet bulb is solved for
            hygrometer[i] = ClimateInputs.builder().dryBulbC(t).rhPercent(30 + (i % 60)).airSpeedMps(1.2)
                    .elevationM(240).build();
        }
        long perRound = 4_000_000;
        for (int w = 0; w < 3; w++) { // warm-up: let the JIT compile all three loops
            baseline(dryBulbs, perRound / 4);
            derive(psychrometer, perRound / 4);
            derive(hygrometer, perRound / 4);
        }
        double[] base = new double[ROUNDS], psy = new double[ROUNDS], hyg = new double[ROUNDS];
        double[] psyRatio = new double[ROUNDS], hygRatio = new double[ROUNDS];
        for (int r = 0; r < ROUNDS; r++) {
            base[r] = baseline(dryBulbs, perRound);
            psy[r] = derive(psychrometer, perRound);
            hyg[r] = derive(hygrometer, perRound);
            psyRatio[r] = base[r] / psy[r];
            hygRatio[r] = base[r] / hyg[r];
        }
        System.out.printf(Locale.ROOT, "baseline Magnus e_w only          %,12.0f /s%n", median(base));
        System.out.printf(Locale.ROOT, "derive, dry+wet bulb+air+globe    %,12.0f zones/s  (cost = %.1f x baseline)%n",
                median(psy), median(psyRatio));
        System.out.printf(Locale.ROOT, "derive, dry+RH+air (wet-bulb solve) %,10.0f zones/s  (cost = %.1f x baseline)%n",
                median(hyg), median(hygRatio));
        System.out.println("(checksum " + (sink != 0) + ")");
    }

    private static double baseline(double[] dryBulbs, long n) {
        long start = System.nanoTime();
        double acc = 0;
        for (long i = 0; i < n; i++) acc += Magnus.overWaterKPa(dryBulbs[(int) (i & (ZONES - 1))]);
        long ns = System.nanoTime() - start;
        sink += acc;
        return n * 1e9 / ns;
    }

    private static double derive(ClimateInputs[] inputs, long n) {
        long start = System.nanoTime();
        double acc = 0;
        for (long i = 0; i < n; i++) {
            DerivedClimate d = ZoneClimate.derive(inputs[(int) (i & (ZONES - 1))]);
            acc += d.value(Quantity.THI) + d.value(Quantity.WET_BULB);
        }
        long ns = System.nanoTime() - start;
        sink += acc;
        return n * 1e9 / ns;
    }

    private static double median(double[] values) {
        double[] v = values.clone();
        Arrays.sort(v);
        return v[v.length / 2];
    }
}
