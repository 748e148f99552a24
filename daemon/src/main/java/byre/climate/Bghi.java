package byre.climate;

/**
 * Black globe-humidity index, Buffington et al. 1981 (Trans. ASAE 24(3):711-714):
 * BGHI = Tbg + 0.36 Tdp + 41.5, black-globe and dew-point temperatures in degC.
 */
public final class Bghi {
    private Bghi() {}

    public static double index(double globeC, double dewPointC) {
        return globeC + 0.36 * dewPointC + 41.5;
    }
}
