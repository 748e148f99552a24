package byre.log;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import ch.qos.logback.classic.Logger;
import ch.qos.logback.classic.spi.ILoggingEvent;
import ch.qos.logback.core.read.ListAppender;
import java.time.Duration;
import java.util.concurrent.atomic.AtomicLong;
import org.junit.jupiter.api.Test;
import org.slf4j.LoggerFactory;

/** Warnings keyed by what a device sends stay few in the log and in memory, however many keys it invents. */
class RateLimitedLogTest {
    @Test
    void warningsAboutInventedTopicsKeepABoundedNumberOfKeys() {
        AtomicLong nanos = new AtomicLong();
        ListAppender<ILoggingEvent> own = new ListAppender<>();
        own.start();
        Logger logger = (Logger) LoggerFactory.getLogger("byre.test.RateLimitedLog");
        logger.addAppender(own);
        try {
            RateLimitedLog warnings = new RateLimitedLog(logger, Duration.ofMinutes(1), nanos::get);
            for (int i = 0; i < 50_000; i++) warnings.warn("topic:larkmoor/odd/" + i, "message on larkmoor/odd/" + i + " ignored");
            assertEquals(RateLimitedLog.MAX_KEYS + 1, warnings.keys());
            // the first MAX_KEYS keys are logged once each, the rest together once per interval
            assertEquals(RateLimitedLog.MAX_KEYS + 1, own.list.size());
            nanos.addAndGet(Duration.ofMinutes(2).toNanos());
            warnings.warn("topic:larkmoor/odd/again", "message on larkmoor/odd/again ignored");
            assertTrue(own.list.get(own.list.size() - 1).getFormattedMessage().contains("similar messages held back"));
        } finally {
            logger.detachAppender(own);
        }
    }
}
