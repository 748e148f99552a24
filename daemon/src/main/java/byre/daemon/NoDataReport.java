package byre.daemon;

import byre.rules.RuleSet;
import byre.rules.Watch;
import byre.rules.eval.Plan;
import byre.units.Quantity;
import java.time.Instant;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Set;

/**
 * For a replay: how much of the replayed time each watch's terms had no data (no reading within the zone's
 * max-age, or none yet), so that "0 events" is never a mystery. Fed with every zone reading the watches see.
 */
final class NoDataReport {
    /** One watch: the share of the span with a term lacking data, and the stream that lacked it most. */
    record Line(String watch, double share, String worstStream, double worstShare, boolean worstNeverReported) {
        String text() {
            String s = String.format(Locale.ROOT, "  %s: no data %s of the replayed time", watch, percent(share));
            if (worstStream != null && worstShare > 0) {
                s += worstNeverReported ? " (" + worstStream + " never reported)"
                        : String.format(Locale.ROOT, " (most: %s, %s)", worstStream, percent(worstShare));
            }
            return s;
        }
    }

    /** Times a stream had data: merged [from, to] spans, to = a reading's time plus the max-age. */
    private static final class Spans {
        final long maxAgeMs;
        final List<long[]> closed = new ArrayList<>();
        long from = Long.MIN_VALUE;
        long to = Long.MIN_VALUE;

        Spans(long maxAgeMs) {
            this.maxAgeMs = maxAgeMs;
        }

        void reading(long t) {
            if (from != Long.MIN_VALUE && t <= to) {
                to = Math.max(to, t + maxAgeMs);
                return;
            }
            if (from != Long.MIN_VALUE) closed.add(new long[] {from, to});
            from = t;
            to = t + maxAgeMs;
        }

        List<long[]> all() {
            List<long[]> l = new ArrayList<>(closed);
            if (from != Long.MIN_VALUE) l.add(new long[] {from, to});
            return l;
        }
    }

    private final RuleSet rules;
    private final Map<String, Spans> streams = new HashMap<>();

    NoDataReport(RuleSet rules) {
        this.rules = rules;
    }

    private static String key(String zone, Quantity q) {
        return zone + "." + q.id();
    }

    void reading(String zone, Quantity q, Instant at) {
        streams.computeIfAbsent(key(zone, q), k -> new Spans(rules.maxAge(zone).toMillis())).reading(at.toEpochMilli());
    }

    /** One line per watch, in the order of the rule files, over the replayed span [from, to]. */
    List<Line> lines(Instant from, Instant to) {
        List<Line> out = new ArrayList<>();
        long a = from.toEpochMilli();
        long b = to.toEpochMilli();
        if (b <= a) return out;
        for (Watch w : rules.watches()) {
            Set<String> keys = new LinkedHashSet<>();
            for (String zone : w.zones()) {
                terms(w.raiseCondition(), zone, keys);
                if (w.clearCondition() != null) terms(w.clearCondition(), zone, keys);
            }
            List<long[]> common = List.of(new long[] {a, b});
            String worst = null;
            double worstShare = -1;
            boolean never = false;
            for (String k : keys) {
                Spans s = streams.get(k);
                List<long[]> have = s == null ? List.of() : s.all();
                double share = 1 - covered(intersect(List.of(new long[] {a, b}), have)) / (double) (b - a);
                if (share > worstShare) {
                    worstShare = share;
                    worst = k;
                    never = s == null;
                }
                common = intersect(common, have);
            }
            out.add(new Line(w.name(), 1 - covered(common) / (double) (b - a), worst, Math.max(0, worstShare), never));
        }
        return out;
    }

    static String percent(double share) {
        double p = share * 100;
        if (p > 0 && p < 1) return "under 1 %";
        return String.format(Locale.ROOT, "%.0f %%", p);
    }

    private static long covered(List<long[]> spans) {
        long n = 0;
        for (long[] s : spans) n += s[1] - s[0];
        return n;
    }

    /** The intersection of two lists of sorted, disjoint spans. */
    private static List<long[]> intersect(List<long[]> x, List<long[]> y) {
        List<long[]> out = new ArrayList<>();
        int i = 0;
        int j = 0;
        while (i < x.size() && j < y.size()) {
            long lo = Math.max(x.get(i)[0], y.get(j)[0]);
            long hi = Math.min(x.get(i)[1], y.get(j)[1]);
            if (lo < hi) out.add(new long[] {lo, hi});
            if (x.get(i)[1] < y.get(j)[1]) i++;
            else j++;
        }
        return out;
    }

    /** The streams a condition reads, for the instance in {@code zone}. */
    private static void terms(Plan.Cond c, String zone, Set<String> out) {
        if (c instanceof Plan.All a) {
            for (Plan.Cond p : a.parts()) terms(p, zone, out);
        } else if (c instanceof Plan.Any a) {
            for (Plan.Cond p : a.parts()) terms(p, zone, out);
        } else if (c instanceof Plan.Neg n) {
            terms(n.inner(), zone, out);
        } else if (c instanceof Plan.Cmp cmp) {
            term(cmp.left(), zone, out);
            term(cmp.right(), zone, out);
        } else if (c instanceof Plan.Silent s) {
            out.add(name(s.term(), zone));
        } else if (c instanceof Plan.Stuck s) {
            out.add(name(s.term(), zone));
        }
    }

    private static void term(Plan.Value v, String zone, Set<String> out) {
        if (v instanceof Plan.Latest l) out.add(name(l.term(), zone));
        else if (v instanceof Plan.Window w) out.add(name(w.term(), zone));
        else if (v instanceof Plan.HoursAbove h) out.add(name(h.term(), zone));
        // Plan.Const reads no stream
    }

    private static String name(Plan.TermPlan t, String zone) {
        return key(t.zone() != null ? t.zone() : zone, t.quantity());
    }
}
