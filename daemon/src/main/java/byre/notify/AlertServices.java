package byre.notify;

import byre.alerts.AckLinks;
import byre.alerts.EventText;
import byre.alerts.IdSource;
import byre.alerts.IncidentBook;
import byre.config.AlertSettings;
import byre.config.ByreConfig;
import byre.config.ChannelConfig;
import byre.history.HistoryStore;
import byre.mqtt.MqttLink;
import io.micrometer.core.instrument.MeterRegistry;
import java.security.SecureRandom;
import java.time.Clock;
import java.time.Duration;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.function.BiConsumer;
import java.util.function.Function;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/** Assembles an {@link AlertService} from the configuration, the history file and the broker link. */
public final class AlertServices {
    private static final Logger LOG = LoggerFactory.getLogger(AlertServices.class);

    private AlertServices() {}

    /**
     * The daemon's alerting: channels from {@code notify:}, outbox in the history file, open incidents restored
     * from its state table. {@code link} may be null (then mqtt channels fail with a clear reason).
     */
    public static AlertService create(ByreConfig config, HistoryStore store, MqttLink link, MeterRegistry registry, Clock clock) {
        ChannelFactory factory = new ChannelFactory(link, config.timezone());
        Map<String, Channel> channels = new LinkedHashMap<>();
        Map<String, ChannelFactory.Policy> policies = new LinkedHashMap<>();
        for (ChannelConfig c : config.channels().values()) {
            try {
                channels.put(c.name(), factory.build(c));
                policies.put(c.name(), ChannelFactory.policy(c));
            } catch (IllegalArgumentException e) {
                LOG.error("{}", e.getMessage());
            }
        }
        AlertSettings a = config.alerts() == null ? AlertSettings.defaults() : config.alerts();
        String base = config.mqtt().publishPrefix() + "/" + config.site();
        String eventsChannel = null;
        if (config.mqtt().publishEvents() && link != null) {
            // Every event also goes through the outbox to <prefix>/<site>/events, so a central byre sees each raise,
            // reminder and all-clear in order, retried like any channel while the broker is away. Its name is the
            // topic: a configured channel's name cannot hold '/', so the two never meet. Never folded.
            eventsChannel = base + "/events";
            channels.put(eventsChannel, new MqttChannel(eventsChannel, eventsChannel, false, link, ChannelFactory.DEFAULT_TIMEOUT.toMillis()));
            policies.put(eventsChannel, new ChannelFactory.Policy(Integer.MAX_VALUE, ChannelFactory.DEFAULT_GIVE_UP));
        }
        AlertService service = assemble(config.site(), channels, policies, new Outbox(store.openSyncedConnection(), store.writeTurn()), store::putState,
                prefix -> store.loadState(prefix), clock, new SecureRandom(), IdSource.random(), registry,
                a.selfAlertNotify(), a.channelFailingAfter(), base + "/ack");
        if (eventsChannel != null) service.sendEveryEventTo(eventsChannel);
        service.book().setText(new EventText(config.site(), config.units() == ByreConfig.DisplayUnits.US, AckLinks.NONE));
        return service;
    }

    /**
     * The same from parts (tests, benchmarks). {@code saveState} and {@code loadState} are the state table of the
     * outbox's file: the outbox itself commits the incident state together with the events it caused.
     */
    public static AlertService assemble(String site, Map<String, Channel> channels, Map<String, ChannelFactory.Policy> policies,
                                        Outbox outbox, BiConsumer<String, String> saveState,
                                        Function<String, Map<String, String>> loadState, Clock clock, Random random,
                                        IdSource ids, MeterRegistry registry, List<String> selfAlertChannels,
                                        Duration channelFailingAfter, String ackTopic) {
        IncidentBook book = new IncidentBook(site, ids);
        book.setSelfAlertChannels(selfAlertChannels);
        String saved = loadState.apply(AlertService.STATE_KEY).get(AlertService.STATE_KEY);
        String problem = book.restore(saved);
        if (problem != null) LOG.error("{}", problem);
        else if (!book.openIncidents().isEmpty()) LOG.info("{} open incident(s) restored", book.openIncidents().size());
        NotifyMetrics metrics = new NotifyMetrics(registry, outbox, clock);
        Dispatcher d = new Dispatcher(outbox, channels, policies, clock, random, ids, site, metrics);
        return new AlertService(book, outbox, d, channels, saveState, clock, channelFailingAfter, ackTopic);
    }
}
