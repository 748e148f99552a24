package byre.notify;

import byre.config.ChannelConfig;
import byre.mqtt.MqttLink;
import java.time.Duration;
import java.time.ZoneId;

/** Builds a {@link Channel} and its delivery policy from a configured channel, through the channel's own kind. */
public final class ChannelFactory {
    public static final int DEFAULT_RATE_LIMIT = ChannelConfig.DEFAULT_RATE_LIMIT;
    public static final Duration DEFAULT_GIVE_UP = ChannelConfig.DEFAULT_GIVE_UP;
    static final Duration DEFAULT_TIMEOUT = Duration.ofSeconds(10);

    private final ChannelKind.Context context;

    /** {@code link} may be null (no mqtt channels then); {@code zone} is the site time zone for message text. */
    public ChannelFactory(MqttLink link, ZoneId zone) {
        this.context = new ChannelKind.Context(link, zone);
    }

    /** Rate limit and give-up age of one channel. */
    public record Policy(int perTenMinutes, Duration giveUp) {
        public static Policy defaults() {
            return new Policy(DEFAULT_RATE_LIMIT, DEFAULT_GIVE_UP);
        }
    }

    public static Policy policy(ChannelConfig c) {
        return new Policy(c.rateLimit(), c.giveUp());
    }

    /** The channel, or an {@link IllegalArgumentException} whose message says what is wrong with it. */
    public Channel build(ChannelConfig c) {
        if (!(c.kind() instanceof ChannelKind<?> kind)) {
            throw new IllegalArgumentException("channel " + c.name() + ": type '" + c.type() + "' cannot be built here");
        }
        return make(kind, c);
    }

    @SuppressWarnings("unchecked") // the loader made c.settings() with this very kind's read()
    private <S> Channel make(ChannelKind<S> kind, ChannelConfig c) {
        return kind.build(c.name(), (S) c.settings(), context);
    }
}
