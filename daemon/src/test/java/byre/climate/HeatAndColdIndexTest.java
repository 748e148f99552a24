package byre.climate;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/** NWS heat index and NWS/MSC wind chill against the published charts and examples. */
class HeatAndColdIndexTest {

    // NWS heat-index chart (NWS Tulsa page srh.noaa.gov/tsa/?n=heatindex), F. Within the chart's rounding
    // (+-1 F), except the high-humidity adjustment zone (80-87 F, RH > 85 %) where the chart shows the raw
    // regression: there +-2.5 F (WPC "The Heat Index Equation": the chart omits the adjustment).
    @ParameterizedTest
    @CsvSource({
            "80,40,80", "80,50,81", "80,60,82", "80,70,83", "80,80,84", "80,90,86", "80,100,87",
            "84,40,83", "84,50,85", "84,60,88", "84,70,90", "84,80,94", "84,90,98", "84,100,103",
            "88,40,88", "88,50,91", "88,60,95", "88,70,100", "88,80,106", "88,90,113", "88,100,121",
            "90,40,91", "90,50,95", "90,60,100", "90,70,106", "90,80,113", "90,90,122", "90,100,132",
            "94,40,97", "94,50,103", "94,60,110", "94,70,119", "94,80,129",
            "96,40,101", "96,50,108", "96,60,116", "96,70,126",
            "100,40,109", "100,50,118", "100,60,129", "110,40,136"})
    void nwsHeatIndexChart(double tF, double rh, double chartF) {
        boolean adjustmentZone = tF >= 80 && tF <= 87 && rh > 85;
        assertEquals(chartF, HeatIndex.fahrenheit(tF, rh), adjustmentZone ? 2.5 : 1.0);
    }

    // The WPC algorithm ("The Heat Index Equation", Rothfusz 1990, NWS SR 90-23) evaluated exactly; MetPy test values agree after
    // rounding (80/40 -> 80, 88/100 -> 121, 92/70 -> 112, 110/40 -> 136, 86/88 -> 104, 96/65 -> 121) and
    // the NWS example "96 F and 65 % -> 121 F".
    @ParameterizedTest
    @CsvSource({
            "80,40,79.58", "88,100,121.21", "92,70,112.18", "110,40,135.66", "86,88,104.19", "96,65,121.03",
            "90,50,94.60", "100,40,109.26", "95,10,89.45", "104,5,95.99", "85,90,101.78", "79,70,79.89",
            "81,39,80.56", "70,50,69.05"})
    void wpcAlgorithmBranches(double tF, double rh, double hiF) {
        assertEquals(hiF, HeatIndex.fahrenheit(tF, rh), 0.01);
    }

    @org.junit.jupiter.api.Test
    void heatIndexInCelsius() {
        assertEquals(34.78, HeatIndex.celsius((90 - 32) / 1.8, 50), 0.01); // 90 F / 50 % -> 94.6 F
    }

    // NWS 2001 wind-chill chart, F and mph (10 m wind), as reproduced on several NWS chart pages.
    @ParameterizedTest
    @CsvSource({
            "40,5,36", "40,10,34", "40,15,32", "40,20,30", "40,30,28", "40,40,27", "40,60,25",
            "30,5,25", "30,10,21", "30,15,19", "30,20,17", "30,30,15", "30,40,13", "30,60,10",
            "20,5,13", "20,10,9", "20,15,6", "20,20,4", "20,30,1", "20,40,-1", "20,60,-4",
            "0,5,-11", "0,10,-16", "0,15,-19", "0,20,-22", "0,30,-26", "0,40,-29", "0,60,-33",
            "-10,5,-22", "-10,10,-28", "-10,15,-32", "-10,20,-35", "-10,30,-39", "-10,40,-43", "-10,60,-48",
            "-20,5,-34", "-20,10,-41", "-20,15,-45", "-20,20,-48", "-20,30,-53", "-20,40,-57", "-20,60,-62"})
    void nwsWindChillChart(double tF, double mph, double chartF) {
        assertEquals(chartF, WindChill.formulaF(tF, mph), 1.0);
        // the metric form is the same index
        double c = WindChill.celsius((tF - 32) / 1.8, mph * 1.609344);
        assertEquals(chartF, c * 1.8 + 32, 1.0);
    }

    // MSC (Environment Canada) wind-chill chart, C and km/h (10 m wind), archived msc.ec.gc.ca page.
    @ParameterizedTest
    @CsvSource({
            "5,5,4", "5,10,3", "5,20,1", "5,30,0", "5,40,-1", "5,60,-2", "5,80,-3",
            "-10,5,-13", "-10,10,-15", "-10,20,-18", "-10,30,-20", "-10,40,-21", "-10,60,-23", "-10,80,-24",
            "-25,5,-30", "-25,10,-33", "-25,20,-37", "-25,30,-39", "-25,40,-41", "-25,60,-43", "-25,80,-45",
            "-40,5,-47", "-40,10,-51", "-40,20,-56", "-40,30,-59", "-40,40,-61", "-40,60,-64", "-40,80,-67"})
    void mscWindChillChart(double tC, double kmh, double chartC) {
        assertEquals(chartC, WindChill.celsius(tC, kmh), 0.5);
    }

    // Published examples: NWS "0 F, 15 mph -> -19 F"; MSC "-25 C and 20 km/h give -37".
    @org.junit.jupiter.api.Test
    void publishedExamples() {
        assertEquals(-19.398, WindChill.formulaF(0, 15), 0.001);
        assertEquals(-36.788, WindChill.formulaC(-25, 20), 0.001);
        assertEquals(-19.520, WindChill.formulaC(-10, 30), 0.001);
    }

    // Convention outside the validity range (T <= 10 C, V > 4.8 km/h; MSC/NWS, MetPy masks the rest):
    // wind chill equals the air temperature.
    @org.junit.jupiter.api.Test
    void conventionOutsideValidity() {
        assertEquals(12.0, WindChill.celsius(12.0, 30), 0);
        assertEquals(-5.0, WindChill.celsius(-5.0, 4.0), 0);
    }

    // MetPy test with face_level_winds=True (x1.5): (20 F, 15 mph) -> 3 F, (0, 30) -> -30 F, (-20, 45) -> -64 F.
    @ParameterizedTest
    @CsvSource({"20,15,3", "0,30,-30", "-20,45,-64", "-40,60,-98"})
    void faceLevelWind(double tF, double mph, double expectF) {
        double c = WindChill.fromPenAirSpeedC((tF - 32) / 1.8, mph * 0.44704);
        assertEquals(expectF, c * 1.8 + 32, 1.0);
    }
}
