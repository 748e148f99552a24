package byre.climate;

/** A convention or assumption that shaped a derivation; fixed texts, so noting one costs nothing. */
public enum Note {
    WIND_CHILL_CALM("wind chill: air speed below 0.9 m/s (4.8 km/h as 10 m wind), equals air temperature (NWS convention)"),
    WIND_CHILL_WARM("wind chill: air above 10 C, equals air temperature (NWS convention)"),
    WIND_CHILL_PEN_WIND("wind chill: pen air speed x 1.5 taken as the 10 m wind of the NWS formula"),
    HEAT_INDEX_SIMPLE("heat index: below 80 F (26.7 C) the NWS simple formula applies; heat stress not expected"),
    SOLAR_ASSUMED_ZERO("cci: no solar sensor, solar radiation taken as 0 W/m2 (indoors)"),
    THI_SOLAR_ASSUMED_ZERO("thi: no solar sensor, solar radiation taken as 0 W/m2 (indoors)"),
    CCI_OUT_OF_RANGE("cci: air temperature outside -30..45 C, the index's stated range"),
    PRESSURE_STANDARD("pressure: no barometer or elevation, 101.325 kPa (sea level) assumed"),
    PRESSURE_FROM_ELEVATION("pressure: standard atmosphere at the zone's elevation (ASHRAE 2017 eq. 3)"),
    ICE_BULB("psychrometer: wet bulb below 0 C, ice-covered bulb coefficient used"),
    WET_BULB_SLIGHTLY_HIGH("psychrometer: wet bulb up to 0.3 C above dry bulb, taken as saturated air"),
    MAGNUS_OUT_OF_RANGE("saturation: dry bulb outside -45..60 C, the WMO Magnus form's stated range");

    private final String text;

    Note(String text) { this.text = text; }

    public String text() { return text; }

    @Override
    public String toString() { return text; }
}
