package byre.notify;

import byre.config.ChannelFields;
import byre.config.ChannelType;
import byre.mqtt.MqttLink;
import java.time.ZoneId;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Set;
import java.util.function.Function;

/**
 * A {@link ChannelType} that can also build its channel. Each channel class declares its kind beside itself
 * ({@code KIND}: keys, required keys, checks, settings record, construction) and {@link ChannelTypes#ALL} lists it.
 */
public interface ChannelKind<S> extends ChannelType<S> {
    /** What a channel may need from the running process: the broker link (null in {@code notify-test}) and the site's time zone. */
    record Context(MqttLink link, ZoneId zone) {}

    /** Builds the channel from settings this kind read (so they passed its checks). */
    @FunctionalInterface
    interface Builder<S> {
        Channel build(String name, S settings, Context context);
    }

    Channel build(String name, S settings, Context context);

    static <S> ChannelKind<S> of(String id, List<String> keys, List<String> required, Function<ChannelFields, S> read, Builder<S> build) {
        Set<String> k = new LinkedHashSet<>(keys);
        return new ChannelKind<>() {
            @Override
            public String id() {
                return id;
            }

            @Override
            public Set<String> keys() {
                return k;
            }

            @Override
            public List<String> required() {
                return required;
            }

            @Override
            public S read(ChannelFields f) {
                return read.apply(f);
            }

            @Override
            public Channel build(String name, S settings, Context context) {
                return build.build(name, settings, context);
            }

            @Override
            public String toString() {
                return id;
            }
        };
    }
}
