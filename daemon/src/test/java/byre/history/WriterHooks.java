package byre.history;

/**
 * Test access to the history writer's own connection for the fault tests in other packages: caps the file
 * at its current size ({@code PRAGMA max_page_count}), as a full disk would, and lifts the cap again.
 */
public final class WriterHooks {
    private WriterHooks() {}

    public static void capAtCurrentSize(HistoryWriter writer) throws Exception {
        writer.runOnWriter(c -> {
            try (var st = c.createStatement(); var rs = st.executeQuery("PRAGMA page_count")) {
                rs.next();
                st.execute("PRAGMA max_page_count = " + rs.getLong(1));
            }
        }).get();
    }

    public static void lift(HistoryWriter writer) throws Exception {
        writer.runOnWriter(c -> {
            try (var st = c.createStatement()) {
                st.execute("PRAGMA max_page_count = 1073741823");
            }
        }).get();
    }
}
