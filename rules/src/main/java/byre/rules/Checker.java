package byre.rules;

import byre.rules.eval.Plan;
import byre.rules.lang.Ast;
import byre.rules.lang.DiagnosticSink;
import byre.rules.lang.Pos;
import byre.rules.lang.RuleFunction;
import byre.units.Dimension;
import byre.units.Quantity;
import byre.units.Suggest;
import byre.units.Unit;
import java.time.Duration;
import java.time.LocalTime;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Optional;
import java.util.Set;
import java.util.TreeSet;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * Resolves one parsed watch against the context: zones, groups, quantities, units and channels;
 * converts values to canonical units; reports errors and warnings.
 */
final class Checker {
    static final Set<String> PLACEHOLDERS = new LinkedHashSet<>(List.of("watch", "zone", "quantity", "value", "unit", "level", "since", "site"));
    private static final long MAX_WINDOW_MS = 31L * 86_400_000;
    private static final long REMIND_FLOOR_MS = 5 * 60_000;
    private static final Pattern PLACEHOLDER = Pattern.compile("\\{([^{}]*)\\}");

    private final RuleContext ctx;
    private final DiagnosticSink sink;
    private boolean failed;
    // Per watch: the zone set of glob/group selectors, which all must agree.
    private Set<String> multiZones;
    private String multiText;
    private Ast.Term multiTerm;
    private final Set<Quantity> instanceQuantities = new LinkedHashSet<>();
    private final List<Plan.TermPlan> terms = new ArrayList<>();

    /** A value side of a comparison: what it is, so a literal on the other side can be converted. */
    private enum Kind { ABSOLUTE, CHANGE, HOURS, LITERAL }

    private record Typed(Plan.Value plan, Kind kind, Quantity quantity, String text) {}

    private record Threshold(Plan.Value operand, Plan.Op op, double value, String text, Pos pos) {}

    Checker(RuleContext ctx, DiagnosticSink sink) {
        this.ctx = ctx;
        this.sink = sink;
    }

    /** The checked watch, or empty when it has errors (which are in the sink). */
    Optional<Watch> check(Ast.Watch w) {
        failed = false;
        multiZones = null;
        multiText = null;
        multiTerm = null;
        instanceQuantities.clear();
        terms.clear();

        List<Threshold> raiseThresholds = new ArrayList<>();
        List<Threshold> clearThresholds = new ArrayList<>();
        Plan.Cond raise = w.raise() == null ? null : cond(w.raise().cond(), raiseThresholds);
        if (raise == null) failed = true;
        int raiseTermCount = terms.size();
        Plan.Cond clear = w.clear() == null ? null : cond(w.clear().cond(), clearThresholds);

        long raiseHold = w.raise() == null ? 0 : hold(w.raise());
        long clearHold = w.clear() == null ? raiseHold : hold(w.clear());

        Level level = Level.WARNING;
        if (w.level() != null) {
            Optional<Level> l = Level.byId(w.level().text());
            if (l.isEmpty()) error(w.level().pos(), "unknown level '" + w.level().text() + "'" + Suggest.hint(w.level().text(), Level.ids())
                    + "; levels are info, warning and critical");
            else level = l.get();
        }
        if (w.notifyTo().isEmpty()) sink.warning(w.pos(), "watch '" + w.name() + "' has no 'notify' line: its alerts reach no channel");
        List<String> notify = channels(w.notifyTo());
        List<String> escalateTo = channels(w.escalateTo());
        Duration remind = null;
        if (w.remind() != null) {
            if (w.remind().millis() <= 0) error(w.remind().pos(), "'remind every' needs a duration longer than 0s");
            else if (w.remind().millis() < REMIND_FLOOR_MS) {
                sink.warning(w.remind().pos(), "'remind every " + w.remind().text() + "' is under 5 minutes; frequent reminders teach people to ignore alerts");
            }
            remind = Duration.ofMillis(w.remind().millis());
        }
        Duration escalate = w.escalateAfter() == null ? null : Duration.ofMillis(w.escalateAfter().millis());
        String template = Watch.DEFAULT_MESSAGE;
        if (w.message() != null) {
            template = w.message().text();
            placeholders(w.message());
        }
        String clearTemplate = null;
        if (w.clearMessage() != null) {
            clearTemplate = w.clearMessage().text();
            placeholders(w.clearMessage());
        }
        TimeWindow only = w.only() == null ? null
                : new TimeWindow(LocalTime.of(w.only().startMinute() / 60, w.only().startMinute() % 60),
                LocalTime.of(w.only().endMinute() / 60, w.only().endMinute() % 60));

        List<String> zones = failed || terms.isEmpty() ? List.of() : instanceZones();
        if (failed) return Optional.empty();

        // Warnings that need a resolved watch.
        if (w.clear() == null && !w.hadSyntaxErrors() && hasComparison(raise)) {
            String after = raiseHold > 0 ? "when the raise condition has been false for " + w.raise().hold().text()
                    : "as soon as the raise condition is false";
            sink.warning(w.raise().pos(), "watch '" + w.name() + "' has no 'clear when' line, so it has no hysteresis band: it clears " + after);
        }
        if (raiseThresholds.size() == 1 && clearThresholds.size() == 1
                && raise instanceof Plan.Cmp && clear instanceof Plan.Cmp) {
            sideWarning(raiseThresholds.get(0), clearThresholds.get(0));
        }
        intervalWarning(w.raise(), raiseHold, terms.subList(0, raiseTermCount), zones);
        if (w.clear() != null) intervalWarning(w.clear(), clearHold, terms.subList(raiseTermCount, terms.size()), zones);

        Quantity quantity = terms.get(0).quantity();
        return Optional.of(new Watch(w.name(), w.file(), w.pos().line(), level, notify, remind, escalate, escalateTo, template, clearTemplate,
                only, zones, Duration.ofMillis(raiseHold), Duration.ofMillis(clearHold), quantity, raise, clear));
    }

    /** Every {@code {name}} of a message must be a known placeholder; the caret points at the unknown one. */
    private void placeholders(Ast.Text text) {
        Matcher m = PLACEHOLDER.matcher(text.text());
        while (m.find()) {
            if (!PLACEHOLDERS.contains(m.group(1))) {
                Pos p = text.pos();
                error(new Pos(p.line(), p.col() + 1 + m.start(), m.end() - m.start()), "unknown placeholder '{" + m.group(1) + "}'"
                        + Suggest.closest(m.group(1), PLACEHOLDERS).map(s -> " (did you mean '{" + s + "}'?)").orElse("")
                        + "; placeholders are {watch} {zone} {quantity} {value} {unit} {level} {since} {site}");
            }
        }
    }

    private void error(Pos p, String message) {
        failed = true;
        sink.error(p, message);
    }

    private long hold(Ast.When when) {
        if (when.hold() == null) return 0;
        if (when.hold().millis() > MAX_WINDOW_MS) error(when.hold().pos(), "hold time " + when.hold().text() + " is longer than 31d");
        return when.hold().millis();
    }

    private List<String> channels(List<Ast.Word> names) {
        List<String> out = new ArrayList<>();
        for (Ast.Word n : names) {
            if (!ctx.channels().contains(n.text())) {
                error(n.pos(), "unknown channel '" + n.text() + "'" + Suggest.hint(n.text(), ctx.channels()));
            } else if (!out.contains(n.text())) {
                out.add(n.text());
            }
        }
        return out;
    }

    private static boolean hasComparison(Plan.Cond c) {
        if (c instanceof Plan.Cmp) return true;
        if (c instanceof Plan.All a) return a.parts().stream().anyMatch(Checker::hasComparison);
        if (c instanceof Plan.Any a) return a.parts().stream().anyMatch(Checker::hasComparison);
        if (c instanceof Plan.Neg n) return hasComparison(n.inner());
        return false;
    }

    private void sideWarning(Threshold r, Threshold c) {
        if (!r.operand().equals(c.operand())) return;
        boolean rising = r.op() == Plan.Op.GT || r.op() == Plan.Op.GE;
        boolean falling = r.op() == Plan.Op.LT || r.op() == Plan.Op.LE;
        boolean clearFalls = c.op() == Plan.Op.LT || c.op() == Plan.Op.LE;
        boolean clearRises = c.op() == Plan.Op.GT || c.op() == Plan.Op.GE;
        if ((rising && clearFalls) || (falling && clearRises)) {
            if (c.value() == r.value()) {
                sink.warning(c.pos(), "clear threshold " + c.text() + " equals the raise threshold " + r.text() + ": there is no hysteresis band");
            } else if (rising ? c.value() > r.value() : c.value() < r.value()) {
                String side = rising ? "above" : "below";
                sink.warning(c.pos(), "clear threshold " + c.text() + " is " + side + " the raise threshold " + r.text()
                        + ": both conditions can hold at once and the watch will flap; put it " + (rising ? "below " : "above ") + r.text());
            }
        }
    }

    private void intervalWarning(Ast.When when, long holdMs, List<Plan.TermPlan> ts, List<String> zones) {
        if (when.hold() == null || holdMs <= 0) return;
        for (Plan.TermPlan t : ts) {
            for (String z : t.zone() != null ? List.of(t.zone()) : zones) {
                Optional<Duration> iv = ctx.reportingInterval(z, t.quantity());
                if (iv.isPresent() && holdMs < iv.get().toMillis()) {
                    sink.warning(when.hold().pos(), "hold time " + when.hold().text() + " is shorter than the " + DurationText.of(iv.get())
                            + " reporting interval of " + z + "." + t.quantity().id() + ": the condition rests on a single reading");
                    return;
                }
            }
        }
    }

    private List<String> instanceZones() {
        if (multiZones == null) return List.of(terms.get(0).zone());
        List<String> out = new ArrayList<>();
        for (String z : multiZones) {
            Set<Quantity> have = ctx.quantities(z);
            Optional<Quantity> missing = instanceQuantities.stream().filter(q -> !have.contains(q)).findFirst();
            if (missing.isPresent()) {
                sink.warning(multiTerm.selectorPos(), "zone '" + z + "' matched by '" + multiText + "' has no '" + missing.get().id()
                        + "' stream; the watch skips it" + ctx.whyNoStream(z, missing.get()).map(why -> " (" + why + ")").orElse(""));
            } else {
                out.add(z);
            }
        }
        // No zone at all yet is only possible for a group or glob that may grow (warned about where it was read).
        if (out.isEmpty() && !multiZones.isEmpty()) {
            error(multiTerm.selectorPos(), "no zone matched by '" + multiText + "' has the streams this watch reads");
        }
        return out;
    }

    // ---- conditions ----

    private Plan.Cond cond(Ast.Cond c, List<Threshold> thresholds) {
        if (c instanceof Ast.And a) return new Plan.All(a.parts().stream().map(x -> cond(x, thresholds)).toList());
        if (c instanceof Ast.Or o) return new Plan.Any(o.parts().stream().map(x -> cond(x, thresholds)).toList());
        if (c instanceof Ast.Not n) return new Plan.Neg(cond(n.inner(), thresholds));
        if (c instanceof Ast.Silent s) return new Plan.Silent(term(s.term()));
        if (c instanceof Ast.Stuck s) return new Plan.Stuck(term(s.term()), window(s.window()));
        Ast.Compare cmp = (Ast.Compare) c;
        Typed l = operand(cmp.left());
        Typed r = operand(cmp.right());
        Plan.Op op = Plan.Op.of(cmp.op());
        if (l.kind() == Kind.LITERAL && r.kind() == Kind.LITERAL) {
            error(cmp.pos(), "this comparison has no stream on either side");
            return new Plan.Cmp(new Plan.Const(0), op, new Plan.Const(0));
        }
        if (l.kind() == Kind.LITERAL || r.kind() == Kind.LITERAL) {
            boolean leftLit = l.kind() == Kind.LITERAL;
            Ast.Operand litAst = leftLit ? cmp.left() : cmp.right();
            Typed other = leftLit ? r : l;
            double v = literal(litAst, other);
            Plan.Const k = new Plan.Const(v);
            thresholds.add(new Threshold(other.plan(), leftLit ? op.flip() : op, v, literalText(litAst), litAst.pos()));
            return leftLit ? new Plan.Cmp(k, op, r.plan()) : new Plan.Cmp(l.plan(), op, k);
        }
        if (l.kind() != r.kind() || (l.quantity() != null && r.quantity() != null && l.quantity().dimension() != r.quantity().dimension())) {
            error(cmp.right().pos(), "cannot compare " + l.text() + " with " + r.text() + ": " + kindText(l) + " vs " + kindText(r));
        }
        return new Plan.Cmp(l.plan(), op, r.plan());
    }

    private static String kindText(Typed t) {
        if (t.quantity() == null) return t.kind() == Kind.LITERAL ? "a number" : "unknown";
        return switch (t.kind()) {
            case HOURS -> "hours";
            case CHANGE -> "a change of " + dimensionName(t.quantity().dimension());
            case ABSOLUTE, LITERAL -> dimensionName(t.quantity().dimension());
        };
    }

    private static String literalText(Ast.Operand o) {
        if (o instanceof Ast.Num n) return n.text() + (n.unit() == null ? "" : " " + n.unit().text());
        return ((Ast.DurationValue) o).dur().text();
    }

    private Typed operand(Ast.Operand o) {
        if (o instanceof Ast.Num || o instanceof Ast.DurationValue) return new Typed(null, Kind.LITERAL, null, literalText(o));
        if (o instanceof Ast.TermValue tv) {
            Plan.TermPlan t = term(tv.term());
            return new Typed(new Plan.Latest(t), Kind.ABSOLUTE, t.quantity(), "'" + tv.term().text() + "'");
        }
        Ast.Func f = (Ast.Func) o;
        Plan.TermPlan t = term(f.term());
        long w = window(f.window());
        String text = f.name() + "(" + f.term().text() + ", ...)";
        return switch (RuleFunction.of(f.name())) {
            case AVG -> new Typed(new Plan.Window(Plan.WindowKind.AVG, t, w), Kind.ABSOLUTE, t.quantity(), text);
            case MIN -> new Typed(new Plan.Window(Plan.WindowKind.MIN, t, w), Kind.ABSOLUTE, t.quantity(), text);
            case MAX -> new Typed(new Plan.Window(Plan.WindowKind.MAX, t, w), Kind.ABSOLUTE, t.quantity(), text);
            case RISE -> new Typed(new Plan.Window(Plan.WindowKind.RISE, t, w), Kind.CHANGE, t.quantity(), text);
            case HOURS_ABOVE -> {
                double thr = literal(f.threshold(), new Typed(null, Kind.ABSOLUTE, t.quantity(), "'" + f.term().text() + "'"));
                yield new Typed(new Plan.HoursAbove(t, thr, w), Kind.HOURS, t.quantity(), text);
            }
        };
    }

    /** A literal converted to what the other side of its comparison is. */
    private double literal(Ast.Operand lit, Typed other) {
        Quantity q = other.quantity();
        if (lit instanceof Ast.DurationValue d) {
            if (other.kind() == Kind.HOURS) return d.dur().millis() / 3_600_000.0;
            error(d.pos(), "a duration only compares with hours-above(...); " + other.text() + " is " + kindText(other));
            return 0;
        }
        Ast.Num n = (Ast.Num) lit;
        if (other.kind() == Kind.HOURS) {
            if (n.unit() != null) error(n.unit().pos(), "hours-above(...) counts hours: compare it with a bare number of hours or a duration such as 6h");
            return n.value();
        }
        if (q == null) return n.value();
        Dimension dim = q.dimension();
        if (n.unit() == null) {
            if (dim == Dimension.TEMPERATURE || dim == Dimension.SPEED || dim == Dimension.PRESSURE) {
                String sym = q.canonicalUnit().symbol();
                sink.warning(n.pos(), "'" + n.text() + "' has no unit; it is read as " + n.text() + " " + sym + " (write e.g. '"
                        + n.text() + " " + sym + "')");
            }
            return n.value();
        }
        Optional<Unit> u = Unit.bySymbol(n.unit().text());
        if (u.isEmpty()) {
            error(n.unit().pos(), "unknown unit '" + n.unit().text() + "'" + Suggest.hint(n.unit().text(), Unit.symbols()));
            return n.value();
        }
        if (u.get().dimension() != dim) {
            if (dim == Dimension.INDEX) {
                error(n.unit().pos(), "'" + q.id() + "' is an index without a unit: write the bare number");
            } else {
                error(n.unit().pos(), "unit '" + n.unit().text() + "' is " + article(dimensionName(u.get().dimension())) + ", but '" + q.id()
                        + "' is " + article(dimensionName(dim)) + ": use " + unitList(dim));
            }
            return n.value();
        }
        return other.kind() == Kind.CHANGE ? u.get().deltaToCanonical(n.value()) : u.get().toCanonical(n.value());
    }

    static String dimensionName(Dimension d) {
        return d == Dimension.INDEX ? "index" : d.name().toLowerCase(Locale.ROOT).replace('_', ' ');
    }

    private static String article(String s) {
        return ("aeiou".indexOf(s.charAt(0)) >= 0 ? "an " : "a ") + s;
    }

    private static String unitList(Dimension d) {
        List<String> syms = Arrays.stream(Unit.values()).filter(u -> u.dimension() == d).map(Unit::symbol).toList();
        if (syms.size() == 1) return syms.get(0);
        return String.join(", ", syms.subList(0, syms.size() - 1)) + " or " + syms.get(syms.size() - 1);
    }

    private long window(Ast.Dur d) {
        if (d.millis() <= 0) error(d.pos(), "a window must be longer than 0s");
        else if (d.millis() > MAX_WINDOW_MS) error(d.pos(), "window " + d.text() + " is longer than 31d");
        return Math.max(1, d.millis());
    }

    private Plan.TermPlan term(Ast.Term t) {
        Optional<Quantity> oq = Quantity.byId(t.quantity());
        if (oq.isEmpty()) {
            error(t.quantityPos(), "unknown quantity '" + t.quantity() + "'" + Suggest.hint(t.quantity(), Quantity.ids()));
        }
        Quantity q = oq.orElse(null);
        Plan.TermPlan plan = switch (t.kind()) {
            case ZONE -> {
                String z = t.selector();
                if (!ctx.zones().contains(z)) {
                    if (ctx.groups().containsKey(z)) {
                        error(t.selectorPos(), "unknown zone '" + z + "'; '" + z + "' is a group: write '@" + z + "'");
                    } else {
                        error(t.selectorPos(), "unknown zone '" + z + "'" + Suggest.hint(z, ctx.zones()));
                    }
                } else if (oq.isPresent() && !ctx.quantities(z).contains(q)) {
                    // A stream the zone can never have: the watch could never fire. Say which sensor it lacks.
                    error(t.quantityPos(), ctx.whyNoStream(z, q).orElse("zone '" + z + "' has no '" + q.id() + "' stream"));
                }
                yield new Plan.TermPlan(z, q);
            }
            case GLOB -> {
                Pattern p = glob(t.selector());
                Set<String> matched = new LinkedHashSet<>();
                for (String z : ctx.zones()) if (p.matcher(z).matches()) matched.add(z);
                if (!matched.isEmpty()) {
                    multi(t, matched, t.selector());
                } else if (!ctx.growingGroups().isEmpty()) {
                    sink.warning(t.selectorPos(), "selector '" + t.selector() + "' matches no zone yet; it takes the zones of sites "
                            + "found later that match it");
                    multi(t, matched, t.selector());
                } else {
                    error(t.selectorPos(), "selector '" + t.selector() + "' matches no zone");
                }
                yield new Plan.TermPlan(null, q);
            }
            case GROUP -> {
                Set<String> members = ctx.groups().get(t.selector());
                if ((members == null || members.isEmpty()) && ctx.growingGroups().contains(t.selector())) {
                    sink.warning(t.selectorPos(), "group '@" + t.selector() + "' has no zones yet; the sites found later join it");
                    multi(t, Set.of(), "@" + t.selector());
                } else if (members == null) {
                    List<String> known = ctx.groups().keySet().stream().map(g -> "@" + g).toList();
                    error(t.selectorPos(), "unknown group '@" + t.selector() + "'" + Suggest.hint("@" + t.selector(), known));
                } else if (members.isEmpty()) {
                    error(t.selectorPos(), "group '@" + t.selector() + "' has no zones");
                } else {
                    multi(t, members, "@" + t.selector());
                }
                yield new Plan.TermPlan(null, q);
            }
        };
        if (plan.zone() == null && q != null) instanceQuantities.add(q);
        terms.add(plan);
        return plan;
    }

    private void multi(Ast.Term t, Set<String> zones, String text) {
        if (multiZones == null) {
            multiZones = zones;
            multiText = text;
            multiTerm = t;
        } else if (!new TreeSet<>(multiZones).equals(new TreeSet<>(zones))) {
            error(t.selectorPos(), "'" + text + "' matches other zones than '" + multiText + "' (line " + multiTerm.pos().line()
                    + "): a watch makes one alert per zone, so its selectors must match the same zones");
        }
    }

    private static Pattern glob(String g) {
        StringBuilder re = new StringBuilder();
        for (char c : g.toCharArray()) {
            if (c == '*') re.append(".*");
            else if (c == '?') re.append('.');
            else re.append(Pattern.quote(String.valueOf(c)));
        }
        return Pattern.compile(re.toString());
    }

    static Map<String, Duration> maxAges(RuleContext ctx) {
        java.util.HashMap<String, Duration> m = new java.util.HashMap<>();
        for (String z : ctx.zones()) m.put(z, ctx.maxAge(z));
        return m;
    }
}
