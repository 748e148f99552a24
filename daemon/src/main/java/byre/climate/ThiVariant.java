package byre.climate;

/**
 * The temperature-humidity index forms a zone may choose (T and wet bulb/dew point in degC, RH in %).
 * NRC 1971 is byre's default. Each form is cited once here; its inputs and formula are its row of
 * the {@link Recipe} table.
 */
public enum ThiVariant {
    /** NRC 1971, A Guide to Environmental Research on Animals: (1.8T+32) - (0.55-0.0055RH)(1.8T-26). */
    NRC_1971("nrc-1971", "NRC 1971"),
    /** Thom 1959 (Weatherwise 12:57-61), dry and wet bulb: 0.4(Tdb+Twb)F + 15 = 0.72(Tdb+Twb)C + 40.6. */
    THOM_WET_BULB("thom-wet-bulb", "Thom 1959 (dry and wet bulb)"),
    /** Dew-point form (Yousef 1985, as listed by Dikmen and Hansen 2009): Tdb + 0.36 Tdp + 41.2. */
    DEW_POINT("dew-point", "Yousef 1985 (dew-point form)"),
    /** Mader et al. 2006 (J. Anim. Sci. 84:712-719): 0.8T + (RH/100)(T-14.4) + 46.4. */
    MADER_2006("mader-2006", "Mader et al. 2006"),
    /** Mader et al. 2006 adjusted for wind and sun: 4.51 + THI - 1.992 WS(m/s) + 0.0068 RAD(W/m2). */
    MADER_2006_ADJUSTED("mader-2006-adjusted", "Mader et al. 2006, wind and solar adjusted");

    private final String id;
    private final String method;

    ThiVariant(String id, String method) {
        this.id = id;
        this.method = method;
    }

    public String id() { return id; }

    /** Method name as shown to users. */
    public String method() { return method; }

    public static ThiVariant byId(String id) {
        for (ThiVariant v : values()) if (v.id.equalsIgnoreCase(id)) return v;
        return null;
    }

    @Override
    public String toString() { return id; }
}
