package byre.central;

import byre.config.ByreConfig;
import byre.config.CentralSettings;
import byre.history.HistoryException;
import byre.history.HistoryReader;
import byre.history.HistoryStore;
import java.nio.file.Files;
import java.time.Instant;
import java.util.Map;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The sites a central byre found on the broker ({@code central.discover}), one entry each in the history's state table
 * ({@code central.found.<site>}, the time it was found), so that after a restart the daemon starts with them (their
 * zones, streams and watches) and {@code byre status} and {@code byre history} know them as well. Each gets the
 * zones, groups and max-age of {@code central.defaults} as the file says at the time.
 */
public final class FoundSites {
    private static final Logger LOG = LoggerFactory.getLogger(FoundSites.class);
    /** The state-table key of a found site is this and its id. */
    public static final String PREFIX = "central.found.";

    private final HistoryStore store;

    public FoundSites(HistoryStore store) {
        this.store = store;
    }

    /** Keeps {@code site} for the next start; a history that cannot be written only loses that (logged). */
    void remember(String site, Instant at) {
        if (store == null) return;
        try {
            store.putState(PREFIX + site, at.toString());
        } catch (HistoryException e) {
            LOG.warn("site {}: not kept for the next start ({}); it is found again once it publishes its status", site, e.getMessage());
        }
    }

    /** {@code cfg} with the stored found sites of the running daemon's history. */
    public ByreConfig withStored(ByreConfig cfg) {
        return withStored(cfg, store.loadState(PREFIX));
    }

    /** {@code cfg} with the found sites stored in its history file, read-only (the commands beside a running daemon). */
    public static ByreConfig readStored(ByreConfig cfg) {
        if (!cfg.central().discover() || !Files.isRegularFile(cfg.history().path())) return cfg;
        try (HistoryReader r = HistoryReader.openReadOnly(cfg.history().path())) {
            return withStored(cfg, r.state(PREFIX));
        } catch (HistoryException e) {
            return cfg; // the command then reports the history's problem itself
        }
    }

    /**
     * {@code cfg} with the found sites of these state entries; none when discovery is off. An entry the file now
     * lists, or that could no longer be a site (the file gained a zone of that name), is left out.
     */
    static ByreConfig withStored(ByreConfig cfg, Map<String, String> state) {
        if (!cfg.central().discover()) return cfg;
        Map<String, CentralSettings.Site> found = new java.util.LinkedHashMap<>();
        for (String key : state.keySet()) {
            String site = key.substring(PREFIX.length());
            if (cfg.central().siteIds().contains(site) || problem(cfg, site) != null) continue;
            if (found.size() >= CentralSettings.MAX_FOUND_SITES) break;
            found.put(site, cfg.central().found(site));
        }
        return cfg.withCentralSites(found.values());
    }

    /** Why {@code site} cannot join {@code cfg}, or null. */
    static String problem(ByreConfig cfg, String site) {
        return CentralSettings.siteIdProblem(site, cfg.site(), cfg.zones());
    }
}
