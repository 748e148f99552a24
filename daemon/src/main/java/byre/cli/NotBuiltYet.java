package byre.cli;

import java.util.concurrent.Callable;
import picocli.CommandLine.Command;

/** Verbs whose issue has not landed yet: they answer --help and say plainly that they are not built. */
final class NotBuiltYet {
    private NotBuiltYet() {}

    abstract static class Stub implements Callable<Integer> {
        @Override
        public Integer call() {
            System.err.println("byre: this verb is not built yet in this version.");
            return Main.FAILURE;
        }
    }

    @Command(name = "replay", mixinStandardHelpOptions = true, description = "Run watches over a CSV or the history and print the events.") static final class Replay extends Stub {}
    @Command(name = "ack", mixinStandardHelpOptions = true, description = "Acknowledge an open alert.") static final class Ack extends Stub {}
    @Command(name = "notify-test", mixinStandardHelpOptions = true, description = "Send a test event through one channel.") static final class NotifyTest extends Stub {}
}
