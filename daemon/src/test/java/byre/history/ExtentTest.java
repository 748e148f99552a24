package byre.history;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

/** The range a trend is drawn over: hours without data do not pull it to zero or to infinity. */
class ExtentTest {
    @Test
    void hoursWithoutDataAreSkipped() {
        Extent e = Extent.of(new double[] {Double.NaN, 12.5, -3.0, Double.NaN, 7.25});
        assertFalse(e.empty());
        assertEquals(-3.0, e.lo());
        assertEquals(12.5, e.hi());
    }

    @Test
    void aTrendWithNoDataIsEmpty() {
        assertTrue(Extent.of(new double[] {Double.NaN, Double.NaN}).empty());
        assertTrue(Extent.of(new double[0]).empty());
        assertFalse(Extent.of(new double[] {4.0}).empty(), "one value is a flat line, not nothing");
    }
}
