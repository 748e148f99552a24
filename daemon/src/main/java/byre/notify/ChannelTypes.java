package byre.notify;

import java.util.List;

/** Every kind of channel byre has, in the order {@code byre check} names them. A new kind is one line here. */
public final class ChannelTypes {
    public static final List<ChannelKind<?>> ALL = List.of(
            WebhookChannel.KIND,
            MqttChannel.KIND,
            EmailChannel.KIND,
            CommandChannel.KIND);

    private ChannelTypes() {}
}
