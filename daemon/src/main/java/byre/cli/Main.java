package byre.cli;

import picocli.CommandLine;
import picocli.CommandLine.Command;

/** Entry point of {@code byre}: one verb per job (README, Operations). */
@Command(name = "byre", mixinStandardHelpOptions = true, version = "byre 0.1.0",
        description = "Barn-climate ingest and alerting daemon.",
        subcommands = {
                RunCommand.class,
                DemoCommand.class,
                CheckCommand.class,
                CalcCommand.class,
                ReplayCommand.class,
                StatusCommand.class,
                HistoryCommand.class,
                AckCommand.class,
                NotifyTestCommand.class,
                BrokerAclCommand.class,
        })
public final class Main implements Runnable {
    /** Exit codes: 0 ok, 1 runtime failure, 2 bad usage or configuration. */
    public static final int OK = 0;
    public static final int FAILURE = 1;
    public static final int USAGE = 2;

    @Override
    public void run() {
        new CommandLine(this).usage(System.out);
    }

    public static void main(String[] args) {
        LogTime.configure(); // before the first logger: the console pattern reads it
        byre.mqtt.PahoLog.install(); // the MQTT client logs into byre's log (also the demo's feed, which starts first)
        System.exit(execute(args));
    }

    /** Runs one command line and returns its exit code (tests call this). */
    public static int execute(String... args) {
        CommandLine cl = new CommandLine(new Main());
        cl.setExitCodeExceptionMapper(e -> FAILURE);
        cl.setParameterExceptionHandler((ex, a) -> {
            ex.getCommandLine().getErr().println("byre: " + ex.getMessage());
            ex.getCommandLine().usage(ex.getCommandLine().getErr());
            return USAGE;
        });
        return cl.execute(args);
    }
}
