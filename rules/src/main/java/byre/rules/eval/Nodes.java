package byre.rules.eval;

import java.util.ArrayList;
import java.util.List;
import java.util.function.BiFunction;

/**
 * Binds a checked condition to live streams for one instance. Conditions are three-valued: a value
 * without fresh data is unknown, and unknown neither starts nor completes a raise or a clear.
 */
final class Nodes {
    static final int F = 0;
    static final int T = 1;
    static final int U = 2;

    interface Test { int test(long now); }

    interface Num { double value(long now); }

    private final String zone;
    private final BiFunction<String, byre.units.Quantity, Stream> streams;
    private final Instance inst;
    private final java.util.function.LongSupplier engineStart;
    final List<Stream> silent = new ArrayList<>();
    Num firstValue;

    Nodes(String zone, BiFunction<String, byre.units.Quantity, Stream> streams, Instance inst, java.util.function.LongSupplier engineStart) {
        this.zone = zone;
        this.streams = streams;
        this.inst = inst;
        this.engineStart = engineStart;
    }

    private Stream stream(Plan.TermPlan t) {
        Stream s = streams.apply(t.zone() != null ? t.zone() : zone, t.quantity());
        s.addDependent(inst);
        return s;
    }

    Test bind(Plan.Cond c) {
        if (c instanceof Plan.All a) {
            Test[] ps = a.parts().stream().map(this::bind).toArray(Test[]::new);
            return now -> {
                int res = T;
                for (Test p : ps) {
                    int v = p.test(now);
                    if (v == F) return F;
                    if (v == U) res = U;
                }
                return res;
            };
        }
        if (c instanceof Plan.Any a) {
            Test[] ps = a.parts().stream().map(this::bind).toArray(Test[]::new);
            return now -> {
                int res = F;
                for (Test p : ps) {
                    int v = p.test(now);
                    if (v == T) return T;
                    if (v == U) res = U;
                }
                return res;
            };
        }
        if (c instanceof Plan.Neg n) {
            Test inner = bind(n.inner());
            return now -> {
                int v = inner.test(now);
                return v == U ? U : 1 - v;
            };
        }
        if (c instanceof Plan.Silent s) {
            Stream st = stream(s.term());
            silent.add(st);
            if (firstValue == null) firstValue = now -> st.last;
            return now -> st.silent(now, engineStart.getAsLong()) ? T : F;
        }
        if (c instanceof Plan.Stuck s) {
            Stream st = stream(s.term());
            long w = s.windowMs();
            if (firstValue == null) firstValue = now -> st.last;
            return now -> {
                int v = st.stuck(now, w);
                return v < 0 ? U : v;
            };
        }
        Plan.Cmp cmp = (Plan.Cmp) c;
        Num l = value(cmp.left());
        Num r = value(cmp.right());
        return switch (cmp.op()) {
            case LT -> now -> { double a = l.value(now), b = r.value(now); return a != a || b != b ? U : a < b ? T : F; };
            case LE -> now -> { double a = l.value(now), b = r.value(now); return a != a || b != b ? U : a <= b ? T : F; };
            case GT -> now -> { double a = l.value(now), b = r.value(now); return a != a || b != b ? U : a > b ? T : F; };
            case GE -> now -> { double a = l.value(now), b = r.value(now); return a != a || b != b ? U : a >= b ? T : F; };
            case EQ -> now -> { double a = l.value(now), b = r.value(now); return a != a || b != b ? U : a == b ? T : F; };
        };
    }

    private Num value(Plan.Value v) {
        Num n;
        if (v instanceof Plan.Const k) {
            double x = k.value();
            return now -> x;
        } else if (v instanceof Plan.Latest l) {
            Stream s = stream(l.term());
            if (firstValue == null) firstValue = now -> s.last; // events report the last value even if stale
            n = s::latest;
        } else if (v instanceof Plan.Window w) {
            Stream s = stream(w.term());
            long ms = w.windowMs();
            Agg a = s.agg(w.kind() + "/" + ms, () -> switch (w.kind()) {
                case AVG -> new AvgWindow(ms);
                case MIN -> new ExtremeWindow(false, ms);
                case MAX -> new ExtremeWindow(true, ms);
                case RISE -> new RiseWindow(ms);
            });
            n = a::value;
        } else {
            Plan.HoursAbove h = (Plan.HoursAbove) v;
            Stream s = stream(h.term());
            Agg a = s.agg("above/" + h.threshold() + "/" + h.windowMs(), () -> new HoursAboveWindow(h.threshold(), h.windowMs(), s.maxAgeMs));
            n = a::value;
        }
        if (firstValue == null) firstValue = n;
        return n;
    }
}
