package byre.rules.lang;

import byre.rules.lang.Ast.*;
import byre.rules.lang.Token.Kind;
import byre.units.Quantity;
import byre.units.Suggest;
import java.util.ArrayList;
import java.util.List;
import java.util.Set;

/**
 * Hand-written recursive-descent parser. One statement per line; a problem is reported and the rest of
 * its line skipped, so every problem of a file is found in one pass. Nesting is capped so that deep
 * input yields a diagnostic instead of exhausting the stack.
 */
public final class Parser {
    public static final int MAX_DEPTH = 32;
    static final List<String> KEYWORDS = List.of("watch", "raise", "clear", "level", "notify", "remind", "escalate", "only", "message");
    static final List<String> FUNCTIONS = java.util.stream.Stream.concat(RuleFunction.ids().stream(), java.util.stream.Stream.of("silent", "stuck")).toList();
    private static final Set<String> RESERVED = Set.of("and", "or", "not", "for", "when", "to", "every", "after", "between");

    /** Thrown to abandon the current line; the diagnostic (if any) is already recorded. */
    private static final class LineError extends RuntimeException {
        LineError() { super(null, null, false, false); }
    }

    private final List<Token> toks;
    private final DiagnosticSink sink;
    private final List<Watch> watches = new ArrayList<>();
    private int p;
    private Builder cur;
    private String keyword;

    private Parser(List<Token> toks, DiagnosticSink sink) {
        this.toks = toks;
        this.sink = sink;
    }

    /** Parses one file; problems go to the sink. Never throws on bad input. */
    public static List<Watch> parse(String text, DiagnosticSink sink) {
        Parser ps = new Parser(Lexer.lex(text, sink), sink);
        ps.run();
        return ps.watches;
    }

    private void run() {
        while (!peek().is(Kind.EOF)) {
            try {
                statement();
            } catch (LineError e) {
                if (cur != null) {
                    cur.broken = true;
                    // a misspelt 'raise' line is still the watch's raise line: do not also say it is missing
                    if (keyword != null && Suggest.closest(keyword, KEYWORDS).orElse("").equals("raise")) cur.raiseBroken = true;
                }
                while (!peek().is(Kind.EOL) && !peek().is(Kind.EOF)) p++;
            }
            if (peek().is(Kind.EOL)) p++;
        }
        finish();
    }

    private Token peek() { return toks.get(p); }

    private Token peek(int ahead) { return toks.get(Math.min(p + ahead, toks.size() - 1)); }

    private Token next() {
        Token t = toks.get(p);
        if (t.is(Kind.BAD)) throw new LineError();
        if (!t.is(Kind.EOF)) p++;
        return t;
    }

    private LineError fail(Token at, String message) {
        if (!at.is(Kind.BAD)) sink.error(at.pos(), message);
        return new LineError();
    }

    private Token expectWord(String w, String context) {
        Token t = peek();
        if (t.isWord(w)) return next();
        throw fail(t, "expected '" + w + "' " + context + ", found " + t.shown());
    }

    private void expectEol() {
        Token t = peek();
        if (!t.is(Kind.EOL) && !t.is(Kind.EOF)) throw fail(t, "unexpected " + t.shown() + " at the end of the line");
    }

    private void statement() {
        Token t = peek();
        keyword = null;
        if (t.is(Kind.EOL) || t.is(Kind.EOF)) return;
        if (t.is(Kind.BAD)) throw new LineError();
        if (!t.is(Kind.WORD)) throw fail(t, "expected a keyword such as 'watch', 'raise' or 'notify', found " + t.shown());
        String kw = t.text();
        keyword = kw;
        if (!KEYWORDS.contains(kw)) throw fail(t, "unknown keyword '" + kw + "'" + Suggest.hint(kw, KEYWORDS));
        if (kw.equals("watch")) {
            watchLine();
            return;
        }
        if (cur == null) throw fail(t, "'" + kw + "' must be inside a watch block; start one with 'watch <name>'");
        next();
        switch (kw) {
            case "raise": {
                expectWord("when", "after 'raise'");
                When when = when(t);
                if (cur.raise != null) sink.error(t.pos(), "second 'raise when' in watch '" + cur.name + "' (the first is on line " + cur.raise.pos().line() + ")");
                else cur.raise = when;
                break;
            }
            case "clear": {
                if (peek().isWord("message")) {
                    next();
                    Text text = message("'clear message'");
                    if (cur.clearMessage != null) sink.error(t.pos(), "second 'clear message' in watch '" + cur.name + "'");
                    else cur.clearMessage = text;
                    break;
                }
                Token w = peek();
                if (!w.isWord("when")) {
                    throw fail(w, "expected 'when' or 'message' after 'clear', found " + w.shown()
                            + (w.is(Kind.WORD) ? Suggest.hint(w.text(), List.of("when", "message")) : ""));
                }
                next();
                When when = when(t);
                if (cur.clear != null) sink.error(t.pos(), "second 'clear when' in watch '" + cur.name + "' (the first is on line " + cur.clear.pos().line() + ")");
                else cur.clear = when;
                break;
            }
            case "level": {
                Token v = peek();
                if (!v.is(Kind.WORD)) throw fail(v, "expected a level (info, warning or critical), found " + v.shown());
                next();
                expectEol();
                if (cur.level != null) sink.error(t.pos(), "second 'level' in watch '" + cur.name + "'");
                else cur.level = new Word(v.text(), v.pos());
                break;
            }
            case "notify": {
                List<Word> names = names("a channel name after 'notify'");
                expectEol();
                cur.notify.addAll(names);
                break;
            }
            case "remind": {
                expectWord("every", "after 'remind'");
                Dur d = duration("after 'remind every'");
                expectEol();
                if (cur.remind != null) sink.error(t.pos(), "second 'remind every' in watch '" + cur.name + "'");
                else cur.remind = d;
                break;
            }
            case "escalate": {
                expectWord("after", "after 'escalate'");
                Dur d = duration("after 'escalate after'");
                expectWord("to", "after the escalation delay");
                List<Word> names = names("a channel name after 'to'");
                expectEol();
                if (cur.escalateAfter != null) sink.error(t.pos(), "second 'escalate' in watch '" + cur.name + "'");
                else {
                    cur.escalateAfter = d;
                    cur.escalateTo = names;
                }
                break;
            }
            case "only": {
                expectWord("between", "after 'only'");
                Token a = time();
                expectWord("and", "between the two times");
                Token b = time();
                expectEol();
                if (a.number() == b.number()) {
                    sink.error(a.pos(), "'only between " + a.text() + " and " + b.text() + "' is an empty window; use two different times");
                } else if (cur.only != null) {
                    sink.error(t.pos(), "second 'only between' in watch '" + cur.name + "'");
                } else {
                    cur.only = new Between((int) a.number(), (int) b.number(), a.pos(), b.pos());
                }
                break;
            }
            case "message": {
                Text text = message("'message'");
                if (cur.message != null) sink.error(t.pos(), "second 'message' in watch '" + cur.name + "'");
                else cur.message = text;
                break;
            }
            default:
                throw new IllegalStateException(kw);
        }
    }

    /** The quoted text of a {@code message} or {@code clear message} line, up to the end of the line. */
    private Text message(String after) {
        Token s = peek();
        if (!s.is(Kind.STRING)) throw fail(s, "expected a quoted message after " + after + ", found " + s.shown());
        next();
        expectEol();
        return new Text(s.text(), s.pos());
    }

    private void watchLine() {
        Token kw = next();
        Token n = peek();
        finish();
        if (!n.is(Kind.WORD) || RESERVED.contains(n.text()) || !n.text().matches("[A-Za-z][A-Za-z0-9_-]*")) {
            cur = new Builder("?", kw.pos());
            throw fail(n, "expected a watch name (letters, digits, '-' and '_', starting with a letter) after 'watch', found " + n.shown());
        }
        next();
        cur = new Builder(n.text(), n.pos());
        expectEol();
    }

    private void finish() {
        if (cur == null) return;
        if (!cur.name.equals("?")) {
            if (cur.raise == null && !cur.raiseBroken) sink.error(cur.pos, "watch '" + cur.name + "' has no 'raise when' line");
            else watches.add(new Watch(sink.file(), cur.name, cur.pos, cur.raise, cur.clear, cur.level, List.copyOf(cur.notify),
                    cur.remind, cur.escalateAfter, cur.escalateTo == null ? List.of() : List.copyOf(cur.escalateTo), cur.only, cur.message,
                    cur.clearMessage, cur.broken));
        }
        cur = null;
    }

    private When when(Token kw) {
        Cond c = or(0);
        Dur hold = null;
        if (peek().isWord("for")) {
            next();
            hold = duration("after 'for'");
        }
        expectEol();
        return new When(c, hold, kw.pos());
    }

    private List<Word> names(String what) {
        List<Word> out = new ArrayList<>();
        while (true) {
            Token t = peek();
            if (!t.is(Kind.WORD) || RESERVED.contains(t.text())) throw fail(t, "expected " + what + ", found " + t.shown());
            next();
            out.add(new Word(t.text(), t.pos()));
            if (!peek().is(Kind.COMMA)) return out;
            next();
        }
    }

    private Dur duration(String context) {
        Token t = peek();
        if (t.is(Kind.DURATION)) {
            next();
            return new Dur((long) t.number(), t.text(), t.pos());
        }
        if (t.is(Kind.NUMBER)) throw fail(t, "'" + t.text() + "' needs a time unit: write e.g. " + t.text() + "m (s, m, h or d)");
        throw fail(t, "expected a duration such as 30s, 20m, 2h or 1d " + context + ", found " + t.shown());
    }

    private Token time() {
        Token t = peek();
        if (!t.is(Kind.TIME)) throw fail(t, "expected a time of day such as 18:00, found " + t.shown());
        return next();
    }

    private void depth(int depth, Token at) {
        if (depth > MAX_DEPTH) throw fail(at, "condition nested more than " + MAX_DEPTH + " levels deep");
    }

    private Cond or(int depth) {
        Token first = peek();
        List<Cond> parts = new ArrayList<>();
        parts.add(and(depth));
        while (peek().isWord("or")) {
            next();
            parts.add(and(depth));
        }
        return parts.size() == 1 ? parts.get(0) : new Or(List.copyOf(parts), first.pos());
    }

    private Cond and(int depth) {
        Token first = peek();
        List<Cond> parts = new ArrayList<>();
        parts.add(unary(depth));
        while (peek().isWord("and")) {
            next();
            parts.add(unary(depth));
        }
        return parts.size() == 1 ? parts.get(0) : new And(List.copyOf(parts), first.pos());
    }

    private Cond unary(int depth) {
        Token t = peek();
        depth(depth, t);
        if (t.isWord("not")) {
            next();
            return new Not(unary(depth + 1), t.pos());
        }
        if (t.is(Kind.LPAREN)) {
            next();
            depth(depth + 1, peek());
            Cond c = or(depth + 1);
            if (!peek().is(Kind.RPAREN)) throw fail(peek(), "expected ')' to close the '(' at column " + t.pos().col() + ", found " + peek().shown());
            next();
            return c;
        }
        if (t.is(Kind.WORD) && peek(1).is(Kind.LPAREN) && (t.text().equals("silent") || t.text().equals("stuck"))) {
            next();
            next();
            Term term = term();
            if (t.text().equals("silent")) {
                close(t);
                notCompared(t);
                return new Silent(term, t.pos());
            }
            comma(t);
            Dur w = duration("as the window of stuck()");
            close(t);
            notCompared(t);
            return new Stuck(term, w, t.pos());
        }
        Operand left = operand();
        Token op = peek();
        if (!op.is(Kind.OP)) {
            throw fail(op, "expected a comparison (< <= > >= ==) after " + describe(left) + ", found " + op.shown());
        }
        next();
        Operand right = operand();
        return new Compare(left, op.text(), right, left.pos());
    }

    private static String describe(Operand o) {
        if (o instanceof TermValue tv) return "'" + tv.term().text() + "'";
        if (o instanceof Func f) return f.name() + "(...)";
        if (o instanceof Num n) return "'" + n.text() + "'";
        return "the value";
    }

    private void notCompared(Token fn) {
        if (peek().is(Kind.OP)) throw fail(fn, fn.text() + "(...) is a condition, not a value: use it without a comparison");
    }

    private void comma(Token fn) {
        if (!peek().is(Kind.COMMA)) throw fail(peek(), "expected ',' in " + fn.text() + "(...), found " + peek().shown());
        next();
    }

    private void close(Token fn) {
        if (!peek().is(Kind.RPAREN)) throw fail(peek(), "expected ')' to close " + fn.text() + "(, found " + peek().shown());
        next();
    }

    private Operand operand() {
        Token t = peek();
        switch (t.kind()) {
            case NUMBER:
                return number();
            case DURATION:
                next();
                return new DurationValue(new Dur((long) t.number(), t.text(), t.pos()), t.pos());
            case AT:
                Term term = term();
                return new TermValue(term, term.pos());
            case WORD:
                if (peek(1).is(Kind.LPAREN)) return function();
                if (peek(1).is(Kind.DOT)) {
                    Term tm = term();
                    return new TermValue(tm, tm.pos());
                }
                if (Quantity.byId(t.text()).isPresent()) {
                    throw fail(t, "'" + t.text() + "' needs a zone: write '<zone>." + t.text() + "', '@<group>." + t.text() + "' or '*." + t.text() + "'");
                }
                throw fail(t, "expected a value such as 'cows.thi', 'avg(cows.thi, 30m)' or '72', found " + t.shown());
            default:
                throw fail(t, "expected a value such as 'cows.thi', 'avg(cows.thi, 30m)' or '72', found " + t.shown());
        }
    }

    private Num number() {
        Token t = next();
        Word unit = null;
        Token u = peek();
        if (u.is(Kind.WORD) && !RESERVED.contains(u.text()) && !peek(1).is(Kind.DOT) && !peek(1).is(Kind.LPAREN)) {
            next();
            unit = new Word(u.text(), u.pos());
        }
        return new Num(t.number(), t.text(), unit, t.pos());
    }

    private Func function() {
        Token name = next();
        String n = name.text();
        if (n.equals("silent") || n.equals("stuck")) {
            throw fail(name, n + "(...) is a condition, not a value: use it without a comparison");
        }
        if (!FUNCTIONS.contains(n)) throw fail(name, "unknown function '" + n + "'" + Suggest.hint(n, FUNCTIONS));
        next();
        Term term = term();
        comma(name);
        Num threshold = null;
        if (n.equals(RuleFunction.HOURS_ABOVE.id())) {
            if (!peek().is(Kind.NUMBER)) throw fail(peek(), "expected the threshold of hours-above(term, threshold, window), found " + peek().shown());
            threshold = number();
            comma(name);
        }
        Dur w = duration("as the window of " + n + "()");
        close(name);
        return new Func(n, term, threshold, w, name.pos());
    }

    private Term term() {
        Token t = peek();
        Ast.SelectorKind kind;
        Token sel;
        if (t.is(Kind.AT)) {
            next();
            sel = peek();
            if (!sel.is(Kind.WORD)) throw fail(sel, "expected a group name after '@', found " + sel.shown());
            next();
            kind = Ast.SelectorKind.GROUP;
        } else if (t.is(Kind.WORD)) {
            sel = next();
            kind = sel.text().indexOf('*') >= 0 || sel.text().indexOf('?') >= 0 ? Ast.SelectorKind.GLOB : Ast.SelectorKind.ZONE;
        } else {
            throw fail(t, "expected a stream such as 'cows.thi' or '@calves.wind-chill', found " + t.shown());
        }
        if (!peek().is(Kind.DOT)) {
            throw fail(peek(), "expected '.<quantity>' after '" + (kind == Ast.SelectorKind.GROUP ? "@" : "") + sel.text() + "', found " + peek().shown());
        }
        next();
        Token q = peek();
        if (!q.is(Kind.WORD)) throw fail(q, "expected a quantity such as 'thi' or 'dry-bulb', found " + q.shown());
        next();
        int len = q.pos().col() + q.pos().len() - t.pos().col();
        return new Term(kind, sel.text(), sel.pos(), q.text(), q.pos(), new Pos(t.pos().line(), t.pos().col(), len));
    }

    private static final class Builder {
        final String name;
        final Pos pos;
        When raise;
        When clear;
        Word level;
        final List<Word> notify = new ArrayList<>();
        Dur remind;
        Dur escalateAfter;
        List<Word> escalateTo;
        Between only;
        Text message;
        Text clearMessage;
        boolean raiseBroken;
        boolean broken;

        Builder(String name, Pos pos) {
            this.name = name;
            this.pos = pos;
        }
    }
}
