package byre.demo;

/**
 * The little psychrometry the simulator needs to make a wet-bulb sensor agree with a chosen
 * air temperature and humidity, so that byre, deriving RH back from the two bulbs, sees the
 * humidity the scenario intended. Water-covered bulb only: the scenario keeps the bulbs above 0 C.
 */
final class Psychrometer {
    private Psychrometer() {}

    /** Standard-atmosphere station pressure, ASHRAE Handbook Fundamentals 2017 ch. 1 eq. 3. */
    static double stationPressureKPa(double elevationM) {
        return 101.325 * Math.pow(1 - 2.25577e-5 * elevationM, 5.2559);
    }

    /** Saturation vapour pressure over water in moist air, WMO-No. 8 Annex 4.B eqs. 4.B.1, 4.B.2, 4.B.5. */
    static double saturationHPa(double tempC, double pressureHPa) {
        double pureWater = 6.112 * Math.exp(17.62 * tempC / (243.12 + tempC));
        double enhancement = 1.0016 + 3.15e-6 * pressureHPa - 0.074 / pressureHPa;
        return enhancement * pureWater;
    }

    /**
     * Wet-bulb temperature of an aspirated (Assmann-type) psychrometer for the given air, by
     * bisection on the WMO-No. 8 Annex 4.B psychrometric formula for a water-covered bulb:
     * e = e'w(p, Tw) - 6.53e-4 (1 + 0.000944 Tw) p (T - Tw).
     */
    static double wetBulbC(double dryBulbC, double rhPct, double pressureKPa) {
        double p = pressureKPa * 10.0;
        double vapour = rhPct / 100.0 * saturationHPa(dryBulbC, p);
        double lo = dryBulbC - 40.0;
        double hi = dryBulbC;
        for (int i = 0; i < 60; i++) {
            double mid = (lo + hi) / 2;
            double predicted = saturationHPa(mid, p) - 6.53e-4 * (1 + 0.000944 * mid) * p * (dryBulbC - mid);
            if (predicted > vapour) hi = mid; else lo = mid;
        }
        return (lo + hi) / 2;
    }
}
