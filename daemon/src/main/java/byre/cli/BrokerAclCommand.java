package byre.cli;

import byre.config.BrokerAcl;
import byre.config.ByreConfig;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.concurrent.Callable;
import picocli.CommandLine.Command;
import picocli.CommandLine.Mixin;
import picocli.CommandLine.Option;

/** {@code byre broker-acl}: prints the barn broker's access list for this configuration (used by {@code byre-broker}). */
@Command(name = "broker-acl", mixinStandardHelpOptions = true,
        description = {"Print the access list of the barn's mosquitto for this configuration: byre reads the sensor topics and",
                "works under <prefix>/<site>/, operators may publish to the ack topic, sensor logins may publish to the sensor",
                "topics only. 'byre-broker acl' installs it."})
final class BrokerAclCommand implements Callable<Integer> {
    @Mixin
    ConfigOption config;

    @Option(names = "--password-file", paramLabel = "FILE",
            description = "mosquitto's password file: every login in it other than byre and operators is a sensor login.")
    Path passwordFile;

    @Override
    public Integer call() {
        ByreConfig cfg = config.load(System.err);
        if (cfg == null) return Main.USAGE;
        List<String> logins = List.of();
        if (passwordFile != null && Files.exists(passwordFile)) {
            try {
                logins = BrokerAcl.logins(Files.readAllLines(passwordFile, StandardCharsets.UTF_8));
            } catch (IOException e) {
                System.err.println("byre broker-acl: cannot read " + passwordFile + ": " + e.getMessage());
                return Main.FAILURE;
            }
        }
        try {
            System.out.print(BrokerAcl.render(cfg, logins));
            return Main.OK;
        } catch (IllegalArgumentException e) {
            System.err.println("byre broker-acl: " + e.getMessage());
            return Main.USAGE;
        }
    }
}
