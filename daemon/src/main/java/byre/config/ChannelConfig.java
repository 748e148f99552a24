package byre.config;

import java.time.Duration;

/**
 * One notification channel: its kind, the kind's settings record (secrets resolved), and the delivery policy every
 * channel has ({@code rate-limit} messages per 10 minutes, {@code give-up} age).
 */
public record ChannelConfig(String name, ChannelType<?> kind, Object settings, int rateLimit, Duration giveUp, int line) {
    public static final int DEFAULT_RATE_LIMIT = 10;
    public static final Duration DEFAULT_GIVE_UP = Duration.ofHours(24);

    /** The word after {@code type:}. */
    public String type() {
        return kind.id();
    }

    /** The settings as the record {@code type} (the kind's own). */
    public <S> S settings(Class<S> type) {
        return type.cast(settings);
    }
}
