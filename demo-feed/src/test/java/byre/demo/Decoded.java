package byre.demo;

import java.time.Instant;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * Test-side reading of the simulator's messages, written independently of the simulator: finds
 * the sensor by topic, decodes the payload form the sensor declares, converts to canonical units
 * (C, %, m/s). Conversion factors: 1 ft = 0.3048 m exactly (international foot, 1959 agreement);
 * F to C by (F - 32) * 5/9 (common practice; 32 F = 0 C, 212 F = 100 C).
 */
final class Decoded {
    record Reading(Instant at, String sensor, double value) {}

    private static final Pattern NUMBER = Pattern.compile("-?\\d+(\\.\\d+)?([eE][-+]?\\d+)?");

    static List<Reading> decode(List<FeedMessage> messages) {
        Map<String, SimSensor> byTopic = new HashMap<>();
        for (SimSensor s : LarkmoorFarm.sensors()) byTopic.put(s.topic(), s);
        List<Reading> out = new ArrayList<>();
        for (FeedMessage m : messages) {
            SimSensor s = byTopic.get(m.topic());
            if (s == null) throw new AssertionError("message on a topic no sensor has: " + m);
            out.add(new Reading(m.simTime(), s.id(), canonical(s.unit(), raw(s.payload(), m.payloadText()))));
        }
        return out;
    }

    static double raw(String form, String text) {
        if (form.equals("number")) {
            if (!NUMBER.matcher(text).matches()) throw new AssertionError("not a plain number: " + text);
            return Double.parseDouble(text);
        }
        if (form.startsWith("json:")) {
            String[] path = form.substring(5).split("\\.");
            // walk "a":{"b":... one level at a time
            String rest = text;
            for (int i = 0; i < path.length; i++) {
                int k = rest.indexOf("\"" + path[i] + "\":");
                if (k < 0) throw new AssertionError("no " + path[i] + " in " + text);
                rest = rest.substring(k + path[i].length() + 3);
            }
            Matcher m = NUMBER.matcher(rest);
            if (!m.lookingAt()) throw new AssertionError("no number at " + form + " in " + text);
            return Double.parseDouble(m.group());
        }
        if (form.startsWith("senml:")) {
            String name = form.substring(6);
            Matcher m = Pattern.compile("\\{[^{}]*\"n\":\"" + Pattern.quote(name) + "\"[^{}]*\"v\":(" + NUMBER.pattern() + ")")
                    .matcher(text);
            if (!m.find()) throw new AssertionError("no SenML record " + name + " in " + text);
            return Double.parseDouble(m.group(1));
        }
        throw new AssertionError("unknown payload form " + form);
    }

    static double canonical(String unit, double v) {
        switch (unit) {
            case "C": case "%": case "m/s": return v;
            case "F": return (v - 32.0) * 5.0 / 9.0;
            case "ft/min": return v * 0.3048 / 60.0;
            default: throw new AssertionError("unit not expected in the demo: " + unit);
        }
    }

    /** Latest value of each sensor at every whole minute (by the minute's start), carrying values forward. */
    static TreeMap<Instant, Map<String, Double>> byMinute(List<Reading> readings) {
        TreeMap<Instant, Map<String, Double>> out = new TreeMap<>();
        Map<String, Double> latest = new HashMap<>();
        Map<String, Instant> seen = new HashMap<>();
        for (Reading r : readings) {
            latest.put(r.sensor(), r.value());
            seen.put(r.sensor(), r.at());
            Instant minute = Instant.ofEpochSecond(r.at().getEpochSecond() / 60 * 60);
            Map<String, Double> snapshot = new HashMap<>();
            // only values fresher than 5 minutes (the zones combine inputs of up to their max-age, at least 2m)
            for (var e : latest.entrySet()) {
                if (seen.get(e.getKey()).isAfter(r.at().minusSeconds(300))) snapshot.put(e.getKey(), e.getValue());
            }
            out.put(minute, snapshot);
        }
        return out;
    }
}
