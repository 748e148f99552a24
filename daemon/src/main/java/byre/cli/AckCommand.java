package byre.cli;

import byre.config.ByreConfig;
import byre.json.Json;
import byre.json.JsonWriter;
import java.io.IOException;
import java.net.ConnectException;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.time.Duration;
import java.util.Map;
import java.util.concurrent.Callable;
import picocli.CommandLine.Command;
import picocli.CommandLine.Mixin;
import picocli.CommandLine.Option;
import picocli.CommandLine.Parameters;

/** {@code byre ack INCIDENT}: asks the running daemon, through its admin API ({@code POST /ack}), to acknowledge. */
@Command(name = "ack", mixinStandardHelpOptions = true, description = "Acknowledge an open alert (stops reminders and escalation).")
final class AckCommand implements Callable<Integer> {
    @Parameters(index = "0", paramLabel = "INCIDENT", description = "The incident id from the alert message.")
    String incident;

    @Option(names = "--by", paramLabel = "NAME", description = "Who acknowledges (default: $USER).")
    String by;

    @Mixin
    ConfigOption config = new ConfigOption();

    @Override
    public Integer call() {
        ByreConfig cfg = config.load(System.err);
        if (cfg == null) return Main.USAGE;
        if (!cfg.admin().enabled()) {
            System.err.println("byre: the admin API is off (admin.listen port 0), so the daemon cannot be asked; publish "
                    + "{\"incident\":\"" + incident + "\",\"by\":\"…\"} to " + cfg.mqtt().publishPrefix() + "/" + cfg.site() + "/ack instead");
            return Main.USAGE;
        }
        if (cfg.admin().token() == null) {
            System.err.println("byre: admin.token-file is not set; the admin API needs its token to accept an acknowledgement");
            return Main.USAGE;
        }
        String who = by != null ? by : System.getenv().getOrDefault("USER", "cli");
        String host = cfg.admin().host().contains(":") ? "[" + cfg.admin().host() + "]" : cfg.admin().host();
        return post(URI.create("http://" + host + ":" + cfg.admin().port() + "/ack"), cfg.admin().token().reveal(), incident, who);
    }

    /** Sends the acknowledgement; {@code by} is cleaned first (one line, at most 64 characters), as the daemon would. */
    static int post(URI uri, String token, String incident, String by) {
        return post(uri, token, incident, by, System.out, System.err);
    }

    /**
     * Posts the acknowledgement and prints one plain sentence: the daemon's own words on success
     * ("acknowledged: heat-stress in cow-shed, open 42 min"), the reason on failure; never raw HTTP or JSON.
     */
    static int post(URI uri, String token, String incident, String by, java.io.PrintStream out, java.io.PrintStream err) {
        String body = new JsonWriter().field("incident", incident).field("by", byre.alerts.AckBy.clean(by, "cli")).toString();
        HttpRequest req = HttpRequest.newBuilder(uri).timeout(Duration.ofSeconds(10))
                .header("Content-Type", "application/json").header("Authorization", "Bearer " + token)
                .POST(HttpRequest.BodyPublishers.ofString(body)).build();
        try {
            HttpResponse<String> r = HttpClient.newBuilder().version(HttpClient.Version.HTTP_1_1)
                    .connectTimeout(Duration.ofSeconds(5)).build().send(req, HttpResponse.BodyHandlers.ofString());
            String said = said(r.body());
            if (r.statusCode() == 200) {
                out.println(said != null ? said : "acknowledged: incident " + incident);
                return Main.OK;
            }
            String why = switch (r.statusCode()) {
                case 401, 403 -> "the daemon refused the admin token (see admin.token-file)";
                case 404 -> said != null ? said : "no open incident '" + incident + "'";
                default -> said != null ? said : "the daemon answered with status " + r.statusCode();
            };
            err.println("byre: " + why);
            return Main.FAILURE;
        } catch (ConnectException e) {
            err.println("byre: no daemon answers at " + uri + " (is byre running?)");
            return Main.FAILURE;
        } catch (IOException e) {
            err.println("byre: asking the daemon at " + uri + " failed: " + e.getMessage());
            return Main.FAILURE;
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            return Main.FAILURE;
        }
    }

    /** The sentence in the daemon's answer ({@code message}, or {@code error}), or null when there is none. */
    private static String said(String body) {
        try {
            if (Json.parse(body) instanceof Map<?, ?> m) {
                for (String key : new String[] {"message", "error", "detail"}) {
                    if (m.get(key) instanceof String s && !s.isBlank()) return s;
                }
            }
        } catch (RuntimeException ignored) {
            // not JSON: no sentence to show
        }
        return null;
    }
}
