package byre.zones;

import byre.config.ZoneConfig;

/**
 * Computes a zone's derived quantities from its latest fresh inputs. {@code inputs} and {@code out}
 * are indexed by {@code Quantity.ordinal()} in canonical units; NaN means missing. Implementations
 * write NaN for anything they cannot derive and report problems through the return value.
 */
public interface ZoneDeriver {
    /** Returns null when all went well, or a short description of a skipped derivation. */
    String derive(ZoneConfig zone, double[] inputs, double[] out);

    /** A deriver that derives nothing (raw readings only). */
    ZoneDeriver NONE = (zone, inputs, out) -> {
        java.util.Arrays.fill(out, Double.NaN);
        return null;
    };
}
