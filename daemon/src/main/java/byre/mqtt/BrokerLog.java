package byre.mqtt;

import byre.log.RateLimitedLog;
import ch.qos.logback.classic.Level;
import ch.qos.logback.classic.LoggerContext;
import ch.qos.logback.classic.turbo.TurboFilter;
import ch.qos.logback.core.spi.FilterReply;
import java.time.Duration;
import java.util.concurrent.atomic.AtomicLong;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;
import org.slf4j.Marker;
import org.slf4j.helpers.MessageFormatter;

/**
 * Turns the embedded broker's error reports (an oversized packet, a malformed one, a bad topic: each logged by
 * the broker library with a 40-line stack trace) into one byre line naming the cause, at most once a minute per
 * cause, and a count ({@code byre.broker.errors}). Installed once per process in logback, which byre uses.
 */
final class BrokerLog extends TurboFilter {
    private static final Logger LOG = LoggerFactory.getLogger(EmbeddedBroker.class);
    private static final AtomicLong ERRORS = new AtomicLong();
    private static boolean installed;

    private final RateLimitedLog lines = new RateLimitedLog(LOG, Duration.ofMinutes(1), System::nanoTime);

    /** Adds the filter to logback once; does nothing when another logging backend is bound. */
    static synchronized void install() {
        if (installed || !(LoggerFactory.getILoggerFactory() instanceof LoggerContext ctx)) return;
        BrokerLog filter = new BrokerLog();
        filter.setName("byre-broker-errors");
        filter.start();
        ctx.addTurboFilter(filter);
        installed = true;
    }

    /** Broker errors reported since the process started. */
    static long errors() {
        return ERRORS.get();
    }

    @Override
    public FilterReply decide(Marker marker, ch.qos.logback.classic.Logger logger, Level level, String format, Object[] params,
                              Throwable t) {
        if (level == null || !level.isGreaterOrEqual(Level.WARN)) return FilterReply.NEUTRAL;
        String name = logger.getName();
        if (!name.startsWith("io.moquette") && !name.startsWith("io.netty")) return FilterReply.NEUTRAL;
        Throwable thrown = t != null ? t : MessageFormatter.getThrowableCandidate(params);
        if (thrown == null) return FilterReply.NEUTRAL;
        ERRORS.incrementAndGet();
        Throwable root = thrown;
        while (root.getCause() != null && root.getCause() != root) root = root.getCause();
        String what = format == null ? "" : MessageFormatter.arrayFormat(format, params).getMessage();
        String cause = root.getClass().getSimpleName() + (root.getMessage() == null ? "" : ": " + root.getMessage());
        // One line a minute per kind of problem: the cause's class and its message up to the first colon, without
        // numbers ("invalid publish topic name", not the topic a client sent); the rate-limited log keeps few keys.
        String gist = root.getMessage() == null ? "" : root.getMessage().replaceAll("[0-9]+", "#");
        int colon = gist.indexOf(':');
        String kind = root.getClass().getName() + ":" + gist.substring(0, Math.min(colon < 0 ? gist.length() : colon, 40));
        lines.warn(kind, "embedded broker: " + clean(what) + " (" + clean(cause) + ")");
        return FilterReply.DENY;
    }

    /** Client ids and topics come from the network: no control characters, and short. */
    static String clean(String s) {
        StringBuilder sb = new StringBuilder(Math.min(s.length(), 200));
        for (int i = 0; i < s.length() && sb.length() < 200; i++) {
            char c = s.charAt(i);
            sb.append(Character.isISOControl(c) ? '?' : c);
        }
        return sb.toString();
    }
}
