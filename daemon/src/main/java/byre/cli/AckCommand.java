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

    static int post(URI uri, String token, String incident, String by) {
        String body = new JsonWriter().field("incident", incident).field("by", by).toString();
        HttpRequest req = HttpRequest.newBuilder(uri).timeout(Duration.ofSeconds(10))
                .header("Content-Type", "application/json").header("Authorization", "Bearer " + token)
                .POST(HttpRequest.BodyPublishers.ofString(body)).build();
        try {
            HttpResponse<String> r = HttpClient.newBuilder().connectTimeout(Duration.ofSeconds(5)).build()
                    .send(req, HttpResponse.BodyHandlers.ofString());
            String detail = r.body();
            try {
                if (Json.parse(r.body()) instanceof Map<?, ?> m && m.get("detail") != null) detail = m.get("detail").toString();
            } catch (RuntimeException ignored) {
                // not JSON: show it as it came
            }
            if (r.statusCode() == 200) {
                System.out.println("incident " + incident + ": " + detail);
                return Main.OK;
            }
            System.err.println("byre: " + (r.statusCode() == 401 || r.statusCode() == 403 ? "the daemon refused the admin token" : "HTTP " + r.statusCode())
                    + ": " + detail);
            return Main.FAILURE;
        } catch (ConnectException e) {
            System.err.println("byre: no daemon answers at " + uri + " (is byre running?)");
            return Main.FAILURE;
        } catch (IOException e) {
            System.err.println("byre: asking the daemon at " + uri + " failed: " + e.getMessage());
            return Main.FAILURE;
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            return Main.FAILURE;
        }
    }
}
