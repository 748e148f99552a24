package byre.demo;

/**
 * Stateless seeded noise: every value is a pure function of (seed, stream, index), so a reading
 * does not depend on which readings were produced before it, and the same seed always gives the
 * same barn. SplitMix64 finaliser for the hash; Box-Muller for the normal deviate.
 */
final class Noise {
    private Noise() {}

    static long mix(long z) {
        z = (z ^ (z >>> 30)) * 0xbf58476d1ce4e5b9L;
        z = (z ^ (z >>> 27)) * 0x94d049bb133111ebL;
        return z ^ (z >>> 31);
    }

    static long hash(long seed, long stream, long index) {
        return mix(mix(mix(seed + 0x9e3779b97f4a7c15L) ^ stream) + index * 0x9e3779b97f4a7c15L);
    }

    /** Uniform in (0, 1). */
    static double uniform(long seed, long stream, long index) {
        return ((hash(seed, stream, index) >>> 11) + 0.5) / (1L << 53);
    }

    /** Standard normal deviate. */
    static double gaussian(long seed, long stream, long index) {
        double u1 = uniform(seed, stream, 2 * index);
        double u2 = uniform(seed, stream, 2 * index + 1);
        return Math.sqrt(-2.0 * Math.log(u1)) * Math.cos(2.0 * Math.PI * u2);
    }

    /**
     * Slow, smooth wander with zero mean and amplitude at most {@code amplitude}: three sines with
     * seeded phases and periods of roughly 1.7, 3.9 and 7.3 hours.
     */
    static double wander(long seed, long stream, double hours, double amplitude) {
        double[] periods = {1.7, 3.9, 7.3};
        double sum = 0;
        for (int k = 0; k < periods.length; k++) {
            double phase = 2 * Math.PI * uniform(seed, stream, 1000 + k);
            sum += Math.sin(2 * Math.PI * hours / periods[k] + phase);
        }
        return amplitude * sum / periods.length;
    }
}
