package byre.notify;

import byre.alerts.AlertEvent;
import byre.json.JsonWriter;
import java.util.LinkedHashMap;
import java.util.Map;

/**
 * A webhook body template with the event's placeholders ({@code {message}}, {@code {zone}}, ...). When the
 * template is JSON (starts with '{' or '['), each value is escaped for use inside a JSON string.
 */
public final class Template {
    private Template() {}

    public static Map<String, String> values(AlertEvent e) {
        Map<String, String> v = new LinkedHashMap<>();
        v.put("id", e.id());
        v.put("incident", e.incident());
        v.put("event", e.kind().id());
        v.put("site", e.site());
        v.put("watch", e.watch());
        v.put("zone", e.zone());
        v.put("level", e.level());
        v.put("quantity", e.quantity());
        v.put("value", Double.isFinite(e.value()) ? JsonWriter.format(e.value()) : "");
        v.put("unit", e.unit());
        v.put("since", e.since() == null ? "" : e.since().toString());
        v.put("at", e.at() == null ? "" : e.at().toString());
        v.put("message", e.message());
        v.put("by", e.by());
        return v;
    }

    public static String render(String template, AlertEvent e) {
        boolean json = template.stripLeading().startsWith("{") || template.stripLeading().startsWith("[");
        Map<String, String> v = values(e);
        StringBuilder out = new StringBuilder();
        int i = 0;
        while (i < template.length()) {
            char c = template.charAt(i);
            int close = c == '{' ? template.indexOf('}', i) : -1;
            if (close > i) {
                String name = template.substring(i + 1, close);
                if (v.containsKey(name)) {
                    String val = v.get(name) == null ? "" : v.get(name);
                    if (json) {
                        StringBuilder q = new StringBuilder();
                        JsonWriter.quote(q, val);
                        out.append(q, 1, q.length() - 1);
                    } else {
                        out.append(val);
                    }
                    i = close + 1;
                    continue;
                }
            }
            out.append(c);
            i++;
        }
        return out.toString();
    }
}
