package byre.config;

import java.util.List;
import java.util.Set;

/**
 * One kind of alert channel as the configuration sees it: its {@code type:} word, its keys, the keys it needs,
 * and how its settings are read and checked. The kinds themselves (with how each is built) live beside the
 * channels and are handed to {@link ConfigLoader}; the loader knows no kind by name.
 *
 * @param <S> the kind's settings record
 */
public interface ChannelType<S> {
    /** The word after {@code type:}. */
    String id();

    /** The kind's own keys, besides {@code type}, {@code rate-limit} and {@code give-up}, which every channel has. */
    Set<String> keys();

    /** Keys without which the channel cannot work. */
    List<String> required();

    /** Reads and checks the settings; each problem goes to {@code f} (with its line), never out as an exception. */
    S read(ChannelFields f);
}
