package byre.history;

/**
 * Test access to the history writer's own connection for the fault tests in other packages: caps the file
 * at its current size ({@code PRAGMA max_page_count}), as a full disk would, and lifts the cap again; holds its write lock.
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

    /**
     * Has the writer's thread take the file's write lock (an open transaction) and keep it until {@code release} holds
     * (at most 10 s), then commit; rows appended meanwhile queue behind it. Returns at once.
     */
    public static java.util.concurrent.CompletableFuture<Void> holdWriteLockUntil(HistoryWriter writer,
                                                                                  java.util.function.BooleanSupplier release) {
        return writer.runOnWriter(c -> {
            WriterTx.begin(c);
            long until = System.nanoTime() + 10_000_000_000L;
            while (!release.getAsBoolean() && System.nanoTime() - until < 0) java.util.concurrent.locks.LockSupport.parkNanos(100_000);
            WriterTx.commit(c);
        });
    }

    public static void lift(HistoryWriter writer) throws Exception {
        writer.runOnWriter(c -> {
            try (var st = c.createStatement()) {
                st.execute("PRAGMA max_page_count = 1073741823");
            }
        }).get();
    }
}
