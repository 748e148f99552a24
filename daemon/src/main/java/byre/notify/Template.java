package byre.notify;

import byre.alerts.AlertEvent;
import byre.alerts.EventText;
import byre.json.JsonWriter;
import byre.units.Suggest;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * A webhook body template with the event's placeholders ({@code {message}}, {@code {zone}}, ...). When the
 * template is JSON (starts with '{' or '['), each value is escaped for use inside a JSON string. A placeholder
 * is a lower-case word in braces; other braces (JSON objects) are left as they are. {@code byre check} refuses
 * a template with an unknown placeholder ({@link #unknown}).
 */
public final class Template {
    /** Every placeholder, in the order of the event JSON. */
    public static final List<String> PLACEHOLDERS = List.of("id", "incident", "event", "site", "watch", "zone", "level",
            "quantity", "value", "unit", "since", "at", "message", "by");
    private static final Pattern PLACEHOLDER = Pattern.compile("\\{([a-z][a-z0-9-]*)\\}");

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
        v.put("value", Double.isFinite(e.value()) ? JsonWriter.format(EventText.rounded(e.quantity(), e.value())) : "");
        v.put("unit", e.unit());
        v.put("since", e.since() == null ? "" : e.since().toString());
        v.put("at", e.at() == null ? "" : e.at().toString());
        v.put("message", e.message());
        v.put("by", e.by());
        return v;
    }

    /** The unknown placeholders of a template, each with a did-you-mean and the list of known ones; empty when all are known. */
    public static List<String> unknown(String template) {
        List<String> out = new ArrayList<>();
        Matcher m = PLACEHOLDER.matcher(template);
        while (m.find()) {
            String name = m.group(1);
            if (PLACEHOLDERS.contains(name)) continue;
            out.add("unknown placeholder '{" + name + "}'" + Suggest.closest(name, PLACEHOLDERS).map(s -> " (did you mean '{" + s + "}'?)").orElse("")
                    + "; placeholders are {" + String.join("} {", PLACEHOLDERS) + "}");
        }
        return out;
    }

    public static String render(String template, AlertEvent e) {
        boolean json = template.stripLeading().startsWith("{") || template.stripLeading().startsWith("[");
        Map<String, String> v = values(e);
        Matcher m = PLACEHOLDER.matcher(template);
        StringBuilder out = new StringBuilder();
        while (m.find()) {
            String rep = m.group();
            if (v.containsKey(m.group(1))) {
                String val = v.get(m.group(1)) == null ? "" : v.get(m.group(1));
                if (json) {
                    StringBuilder q = new StringBuilder();
                    JsonWriter.quote(q, val);
                    rep = q.substring(1, q.length() - 1);
                } else {
                    rep = val;
                }
            }
            m.appendReplacement(out, Matcher.quoteReplacement(rep));
        }
        m.appendTail(out);
        return out.toString();
    }
}
