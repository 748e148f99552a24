package byre.config;

import java.util.Map;

/** One notification channel: its type and its type-specific fields as written (secrets resolved). */
public record ChannelConfig(String name, String type, Map<String, Object> fields, Map<String, Secret> secrets, int line) {
    public String string(String key, String fallback) {
        Object v = fields.get(key);
        return v == null ? fallback : v.toString();
    }
}
