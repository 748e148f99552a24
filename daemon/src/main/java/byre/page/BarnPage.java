package byre.page;

import byre.admin.LiveValues;
import byre.alerts.AckService;
import byre.alerts.OpenIncident;
import byre.central.CentralConsumer;
import byre.config.ByreConfig;
import byre.config.PageSettings;
import byre.daemon.Daemon;
import byre.history.HistoryReader;
import java.io.IOException;
import java.nio.file.Path;
import java.time.Clock;
import java.util.List;
import java.util.Optional;
import java.util.function.Supplier;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The barn page of a running daemon, assembled from the configuration ({@code page:}): its listener, the link key
 * and the signer of acknowledgement links, which it hands to the daemon's messages when {@code page.base-url} is
 * set. {@code byre run} and the tests start it the same way.
 */
public final class BarnPage implements byre.alerts.AckLinks, AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(BarnPage.class);

    private final PageServer server;
    private final AckLinkSigner signer;
    private final boolean linksInMessages;

    private BarnPage(PageServer server, AckLinkSigner signer, boolean linksInMessages) {
        this.server = server;
        this.signer = signer;
        this.linksInMessages = linksInMessages;
    }

    /**
     * Starts the page when {@code page.listen} is set; empty when it is off. A link key that cannot be read or made
     * leaves signed links off (logged) but the page on.
     *
     * @throws IOException when the listener's address cannot be bound
     */
    public static Optional<BarnPage> start(ByreConfig cfg, Daemon daemon, LiveValues live, io.micrometer.core.instrument.MeterRegistry registry,
                                           Clock clock) throws IOException {
        PageSettings ps = cfg.page();
        if (!ps.enabled()) return Optional.empty();
        AckLinkSigner signer = null;
        Path keyFile = ps.keyFile(cfg.history());
        try {
            signer = new AckLinkSigner(LinkKey.loadOrCreate(keyFile), ps.baseUrl() == null ? "" : ps.baseUrl(), ps.linkValid(), clock);
        } catch (IOException e) {
            LOG.error("acknowledgement links are off: {}", e.getMessage());
        }
        if (ps.baseUrl() == null) {
            LOG.info("page.base-url is not set: messages carry no acknowledgement link");
        }
        Supplier<List<OpenIncident>> open = () -> daemon.alerts().book().openIncidents();
        Supplier<HistoryReader> readers = () -> daemon.store().openReader();
        CentralConsumer central = daemon.central();
        BarnPageSource source = central == null ? new BarnPageSource(cfg, live, readers, open)
                : new BarnPageSource(cfg, live, readers, open, central::settings);
        BarnPageHtml.Site site = new BarnPageHtml.Site(cfg.site(), cfg.timezone(), cfg.units() == ByreConfig.DisplayUnits.US);
        // A central byre lists its sites; acknowledging one of a site's incidents sends it to that site (Daemon.acknowledge).
        PageContent content = central == null ? PageContent.barn(site, source, open)
                : PageContent.central(site, CentralPageSource.of(cfg, central, source, readers, open));
        AckService acks = central == null ? daemon.alerts() : daemon::acknowledge;
        PageServer server = PageServer.start(ps.host(), ps.port(), site, content, acks, signer, cfg.admin().token(),
                ps.readingNeedsToken(), clock, registry);
        BarnPage page = new BarnPage(server, signer, ps.linksEnabled() && signer != null);
        if (page.linksInMessages) daemon.alerts().useAckLinks(page);
        return Optional.of(page);
    }

    public int port() {
        return server.port();
    }

    /**
     * The acknowledgement link for an incident as of now, for messages; empty when links are off (no
     * {@code page.base-url}, or no key).
     */
    @Override
    public Optional<String> linkFor(String incidentId) {
        return linksInMessages ? signer.linkFor(incidentId) : Optional.empty();
    }

    /** The signer itself (tests; the message texts take {@link #linkFor}). */
    public Optional<AckLinkSigner> signer() {
        return Optional.ofNullable(signer);
    }

    @Override
    public void close() {
        server.close();
    }
}
