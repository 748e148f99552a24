package byre.central;

import byre.config.CentralSettings;
import byre.ingest.Reading;
import byre.units.Quantity;
import java.nio.charset.StandardCharsets;
import java.time.Clock;
import java.time.Instant;
import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;
import java.util.function.Consumer;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Turns each site's two link signals into its {@code online} stream: the site byre's retained status
 * ({@code online}, or {@code offline} set by its last will) and its bridge's state ({@code uplink}, 1 or 0, which
 * the central broker sets to 0 by itself when the bridge drops). A site is online (1) when its byre says online and
 * its bridge is not known to be down; a central broker the barns reach without a bridge never sees an uplink topic.
 * A reading goes out on every change and again at each {@link #refresh}, so the stream stays fresh for the rules.
 * It also notes when each site was last heard from (the barn page shows how long ago).
 */
public final class SiteLinks {
    private static final Logger LOG = LoggerFactory.getLogger(SiteLinks.class);

    /** What is known of one site; null fields are not known yet. */
    private static final class Link {
        Boolean byreOnline;
        Boolean uplink;
        /** Arrival of the site's newest message sent while the centre listened (not a retained one); null before. */
        Instant heard;

        Double value() {
            if (Boolean.FALSE.equals(byreOnline) || Boolean.FALSE.equals(uplink)) return 0.0;
            return Boolean.TRUE.equals(byreOnline) ? 1.0 : null;
        }
    }

    private final String prefix;
    private final Clock clock;
    private final Consumer<Reading> sink;
    private final Map<String, Link> links = new ConcurrentHashMap<>();

    public SiteLinks(CentralSettings central, String prefix, Clock clock, Consumer<Reading> sink) {
        this.prefix = prefix;
        this.clock = clock;
        this.sink = sink;
        for (String site : central.siteIds()) links.put(site, new Link());
    }

    /** Starts following a site found after the start (its status and bridge topics then count). */
    public void add(String site) {
        links.putIfAbsent(site, new Link());
    }

    /** The topic of a site's status (its byre's last will). */
    public String statusTopic(String site) {
        return prefix + "/" + site + "/status";
    }

    /** The topic of a site's bridge state. */
    public String uplinkTopic(String site) {
        return prefix + "/" + site + "/uplink";
    }

    /** Handles a message on a status or uplink topic of a listed site; anything else is logged and ignored. */
    public void accept(String topic, byte[] payload) {
        String[] levels = topic.split("/", -1);
        Link link = levels.length >= 3 ? links.get(levels[levels.length - 2]) : null;
        if (link == null) return;
        String site = levels[levels.length - 2];
        String text = new String(payload, StandardCharsets.UTF_8).strip();
        Double before;
        synchronized (link) {
            before = link.value();
            if (topic.equals(statusTopic(site))) {
                if (text.equals("online")) link.byreOnline = true;
                else if (text.equals("offline")) link.byreOnline = false;
                else {
                    LOG.warn("site {}: status '{}' is neither online nor offline; ignored", site, clip(text));
                    return;
                }
            } else if (topic.equals(uplinkTopic(site))) {
                if (text.equals("1")) link.uplink = true;
                else if (text.equals("0")) link.uplink = false;
                else {
                    LOG.warn("site {}: bridge state '{}' is neither 1 nor 0; ignored", site, clip(text));
                    return;
                }
            } else {
                return;
            }
            Double after = link.value();
            if (after != null && !after.equals(before)) {
                LOG.info("site {} is {}", site, after == 1.0 ? "online" : "offline");
                emit(site, after);
            }
        }
    }

    /** Sends every known site's state again (each minute or so), so the rules see a fresh stream. */
    public void refresh() {
        links.forEach((site, link) -> {
            synchronized (link) {
                Double v = link.value();
                if (v != null) emit(site, v);
            }
        });
    }

    /** Notes that a message of {@code site} arrived now; a retained one tells nothing of when the site last spoke. */
    public void heard(String site, boolean retained) {
        Link l = links.get(site);
        if (l == null || retained) return;
        Instant now = clock.instant();
        synchronized (l) {
            if (l.heard == null || now.isAfter(l.heard)) l.heard = now;
        }
    }

    /** When a message of the site last arrived while the centre listened, or null. */
    public Instant lastHeard(String site) {
        Link l = links.get(site);
        if (l == null) return null;
        synchronized (l) {
            return l.heard;
        }
    }

    /** 1 or 0 as now known, or null. */
    public Double online(String site) {
        Link l = links.get(site);
        if (l == null) return null;
        synchronized (l) {
            return l.value();
        }
    }

    private void emit(String site, double v) {
        sink.accept(new Reading(CentralSettings.onlineSensor(site), Quantity.ONLINE, v, clock.instant()));
    }

    private static String clip(String s) {
        String one = s.replaceAll("\\p{Cntrl}", "?");
        return one.length() > 40 ? one.substring(0, 40) + "…" : one;
    }
}
