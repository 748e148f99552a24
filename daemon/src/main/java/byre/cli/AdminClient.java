package byre.cli;

import byre.admin.OpenAlert;
import byre.config.AdminSettings;
import byre.json.Json;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.time.Duration;
import java.time.Instant;
import byre.units.Quantity;
import java.util.ArrayList;
import java.util.EnumMap;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/** Asks a running daemon's admin API for its health and open alerts; gives up quickly when nobody answers. */
final class AdminClient {
    private final HttpClient http = HttpClient.newBuilder().connectTimeout(Duration.ofMillis(800)).build();
    private final String base;

    AdminClient(AdminSettings admin) {
        String host = admin.host().equals("0.0.0.0") || admin.host().isEmpty() ? "127.0.0.1"
                : admin.host().equals("::") ? "[::1]" : admin.host().contains(":") ? "[" + admin.host() + "]" : admin.host();
        this.base = "http://" + host + ":" + admin.port();
    }

    /** Health as the daemon reports it, or {@link StatusData.Daemon#UNREACHABLE}. */
    StatusData.Daemon health() {
        try {
            HttpResponse<String> r = get("/health");
            if (r.statusCode() != 200 && r.statusCode() != 503) return StatusData.Daemon.UNREACHABLE;
            List<String> problems = new ArrayList<>();
            if (Json.parse(r.body()) instanceof Map<?, ?> m && m.get("problems") instanceof List<?> l) {
                for (Object o : l) problems.add(String.valueOf(o));
            }
            return new StatusData.Daemon(true, r.statusCode() == 200, problems);
        } catch (Exception e) {
            return StatusData.Daemon.UNREACHABLE;
        }
    }

    /** The daemon's {@code /status} answer: live zone values and open alerts; null when it does not answer. */
    Live status() {
        try {
            HttpResponse<String> r = get("/status");
            if (r.statusCode() != 200 || !(Json.parse(r.body()) instanceof Map<?, ?> m)) return null;
            return new Live(values(m.get("zones")), alerts(m.get("alerts")));
        } catch (Exception e) {
            return null;
        }
    }

    /**
     * Asks the running daemon to write what its history holds back (zone rows wait in memory for the rollups, up to
     * ten minutes); false when nobody answers. The daemon does it at most every few seconds.
     */
    boolean writeHistory() {
        try {
            HttpRequest req = HttpRequest.newBuilder(URI.create(base + "/history/write")).timeout(Duration.ofSeconds(8))
                    .POST(HttpRequest.BodyPublishers.noBody()).build();
            return http.send(req, HttpResponse.BodyHandlers.ofString()).statusCode() == 200;
        } catch (Exception e) {
            return false;
        }
    }

    /** Live zone values (canonical units) by zone, and the open alerts (null when the daemon has no alert stage). */
    record Live(Map<String, Map<Quantity, StatusData.Value>> values, List<OpenAlert> alerts) {}

    private static Map<String, Map<Quantity, StatusData.Value>> values(Object zones) {
        Map<String, Map<Quantity, StatusData.Value>> out = new HashMap<>();
        if (!(zones instanceof Map<?, ?> zm)) return out;
        for (Map.Entry<?, ?> z : zm.entrySet()) {
            if (!(z.getValue() instanceof Map<?, ?> qm)) continue;
            Map<Quantity, StatusData.Value> values = new EnumMap<>(Quantity.class);
            for (Map.Entry<?, ?> q : qm.entrySet()) {
                Quantity quantity = Quantity.byId(String.valueOf(q.getKey())).orElse(null);
                if (quantity == null || !(q.getValue() instanceof Map<?, ?> v) || !(v.get("value") instanceof Double d)) continue;
                Instant at = time(v.get("at"));
                if (at != null) values.put(quantity, new StatusData.Value(d, at));
            }
            out.put(String.valueOf(z.getKey()), values);
        }
        return out;
    }

    private static List<OpenAlert> alerts(Object alerts) {
        try {
            if (!(alerts instanceof List<?> l)) return null;
            List<OpenAlert> out = new ArrayList<>();
            for (Object o : l) {
                if (o instanceof Map<?, ?> a) out.add(alert(a));
            }
            return out;
        } catch (RuntimeException e) {
            return null;
        }
    }

    /** Reads one alert object (the /status form, which is also the event JSON of the README, Alerts and delivery, plus acknowledgement). */
    static OpenAlert alert(Map<?, ?> a) {
        return new OpenAlert(str(a.get("incident")), str(a.get("watch")), str(a.get("zone")), str(a.get("level")),
                str(a.get("quantity")), a.get("value") instanceof Double d ? d : Double.NaN, time(a.get("since")),
                str(a.get("acknowledged-by")), time(a.get("acknowledged-at")), Boolean.TRUE.equals(a.get("from-alert-state")));
    }

    private static String str(Object o) {
        return o instanceof String s ? s : null;
    }

    private static Instant time(Object o) {
        try {
            return o instanceof String s ? Instant.parse(s) : null;
        } catch (RuntimeException e) {
            return null;
        }
    }

    private HttpResponse<String> get(String path) throws Exception {
        HttpRequest req = HttpRequest.newBuilder(URI.create(base + path)).timeout(Duration.ofSeconds(2)).GET().build();
        return http.send(req, HttpResponse.BodyHandlers.ofString());
    }
}
