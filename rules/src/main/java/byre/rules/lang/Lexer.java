package byre.rules.lang;

import byre.rules.lang.Token.Kind;
import java.util.ArrayList;
import java.util.List;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * Splits a rule file into tokens, with an EOL token per line (statements are one line each).
 * A character that cannot start a token is reported once and the rest of its line is skipped
 * (a BAD token tells the parser to skip silently), so a binary file gives one message per line, not per byte.
 */
final class Lexer {
    private static final Pattern DURATION = Pattern.compile("(?:(\\d+(?:\\.\\d+)?)([smhd]))+");
    private static final Pattern DURATION_PART = Pattern.compile("(\\d+(?:\\.\\d+)?)([smhd])");

    private final String s;
    private final DiagnosticSink sink;
    private final List<Token> out = new ArrayList<>();
    private int i;
    private int line = 1;
    private int lineStart;

    private Lexer(String s, DiagnosticSink sink) {
        this.s = s;
        this.sink = sink;
    }

    static List<Token> lex(String text, DiagnosticSink sink) {
        Lexer lx = new Lexer(text, sink);
        lx.run();
        return lx.out;
    }

    private Pos pos(int start) { return new Pos(line, start - lineStart + 1, i - start); }

    private void run() {
        if (s.startsWith("\uFEFF")) i = 1;
        while (i < s.length()) {
            char c = s.charAt(i);
            int start = i;
            if (c == '\n') {
                i++;
                out.add(new Token(Kind.EOL, "", pos(start), 0));
                line++;
                lineStart = i;
            } else if (c == ' ' || c == '\t' || c == '\r' || c == '\f') {
                i++;
            } else if (c == '#') {
                skipLine();
            } else if (c == '"') {
                string();
            } else if (isDigit(c) || ((c == '-' || c == '+' || c == '.') && i + 1 < s.length() && isNumberStart(s.charAt(i + 1), c))) {
                number();
            } else if (isWordStart(c)) {
                while (i < s.length() && isWordChar(s.charAt(i))) i++;
                out.add(new Token(Kind.WORD, s.substring(start, i), pos(start), 0));
            } else if (c == '@') {
                i++; out.add(new Token(Kind.AT, "@", pos(start), 0));
            } else if (c == '.') {
                i++; out.add(new Token(Kind.DOT, ".", pos(start), 0));
            } else if (c == ',') {
                i++; out.add(new Token(Kind.COMMA, ",", pos(start), 0));
            } else if (c == '(') {
                i++; out.add(new Token(Kind.LPAREN, "(", pos(start), 0));
            } else if (c == ')') {
                i++; out.add(new Token(Kind.RPAREN, ")", pos(start), 0));
            } else if (c == '<' || c == '>') {
                i++;
                if (i < s.length() && s.charAt(i) == '=') i++;
                out.add(new Token(Kind.OP, s.substring(start, i), pos(start), 0));
            } else if (c == '=') {
                i++;
                if (i < s.length() && s.charAt(i) == '=') {
                    i++;
                    out.add(new Token(Kind.OP, "==", pos(start), 0));
                } else {
                    bad(start, "'=' is not a comparison; write '=='");
                }
            } else if (c == '!') {
                i++;
                if (i < s.length() && s.charAt(i) == '=') i++;
                bad(start, "'" + s.substring(start, i) + "' is not part of the language; write 'not (a == b)'");
            } else {
                i++;
                if (Character.isHighSurrogate(c) && i < s.length()) i++;
                bad(start, describe(c));
            }
        }
        out.add(new Token(Kind.EOF, "", new Pos(line, i - lineStart + 1, 0), 0));
    }

    private static String describe(char c) {
        if (c == '\uFFFD') return "bytes that are not UTF-8 text (is this a rule file?)";
        if (c < ' ' || c == 0x7f) return String.format("unexpected control character U+%04X (is this a rule file?)", (int) c);
        return "unexpected character '" + c + "'";
    }

    private void bad(int start, String message) {
        Pos p = pos(start);
        sink.error(p, message);
        out.add(new Token(Kind.BAD, "", p, 0));
        skipLine();
    }

    private void skipLine() {
        int nl = s.indexOf('\n', i);
        i = nl < 0 ? s.length() : nl;
    }

    private void string() {
        int start = i++;
        StringBuilder sb = new StringBuilder();
        while (i < s.length()) {
            char c = s.charAt(i);
            if (c == '\n') break;
            if (c == '"') {
                i++;
                out.add(new Token(Kind.STRING, sb.toString(), pos(start), 0));
                return;
            }
            if (c == '\\' && i + 1 < s.length() && (s.charAt(i + 1) == '"' || s.charAt(i + 1) == '\\')) {
                sb.append(s.charAt(i + 1));
                i += 2;
            } else {
                sb.append(c);
                i++;
            }
        }
        int end = i;
        i = start + 1;
        Pos p = pos(start);
        i = end;
        sink.error(p, "unterminated string: add a closing '\"' on the same line");
        out.add(new Token(Kind.BAD, "", p, 0));
    }

    private void number() {
        int start = i;
        if (s.charAt(i) == '-' || s.charAt(i) == '+') i++;
        while (i < s.length() && isDigit(s.charAt(i))) i++;
        if (i < s.length() && s.charAt(i) == '.' && i + 1 < s.length() && isDigit(s.charAt(i + 1))) {
            i++;
            while (i < s.length() && isDigit(s.charAt(i))) i++;
        }
        if (i < s.length() && s.charAt(i) == ':' && i + 1 < s.length() && isDigit(s.charAt(i + 1))) {
            i++;
            while (i < s.length() && isDigit(s.charAt(i))) i++;
            String t = s.substring(start, i);
            Matcher m = Pattern.compile("(\\d{1,2}):(\\d{2})").matcher(t);
            if (m.matches() && Integer.parseInt(m.group(1)) < 24 && Integer.parseInt(m.group(2)) < 60) {
                out.add(new Token(Kind.TIME, t, pos(start), Integer.parseInt(m.group(1)) * 60 + Integer.parseInt(m.group(2))));
            } else {
                bad(start, "'" + t + "' is not a time of day; write HH:MM from 00:00 to 23:59");
            }
            return;
        }
        // A duration is a number glued to s/m/h/d parts (1h30m); "5m/s" is a number and a unit.
        int wordEnd = i;
        while (wordEnd < s.length() && isWordChar(s.charAt(wordEnd))) wordEnd++;
        if (wordEnd > i && Character.isLetter(s.charAt(i)) && s.charAt(start) != '-' && s.charAt(start) != '+') {
            String t = s.substring(start, wordEnd);
            if (DURATION.matcher(t).matches()) {
                i = wordEnd;
                double ms = 0;
                Matcher m = DURATION_PART.matcher(t);
                while (m.find()) ms += Double.parseDouble(m.group(1)) * unitMillis(m.group(2).charAt(0));
                out.add(new Token(Kind.DURATION, t, pos(start), Math.rint(ms)));
                return;
            }
        }
        String t = s.substring(start, i);
        double v;
        try {
            v = Double.parseDouble(t);
        } catch (NumberFormatException e) {
            bad(start, "'" + t + "' is not a number");
            return;
        }
        out.add(new Token(Kind.NUMBER, t, pos(start), v));
    }

    private static double unitMillis(char u) {
        switch (u) {
            case 's': return 1_000;
            case 'm': return 60_000;
            case 'h': return 3_600_000;
            default: return 86_400_000;
        }
    }

    private static boolean isDigit(char c) { return c >= '0' && c <= '9'; }

    private static boolean isNumberStart(char next, char first) {
        return isDigit(next) || (first != '.' && next == '.');
    }

    private static boolean isWordStart(char c) {
        return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || c == '_' || c == '*' || c == '?' || c == '%' || c == '°'
                || (c > 0x7f && Character.isLetter(c));
    }

    private static boolean isWordChar(char c) {
        return isWordStart(c) || isDigit(c) || c == '-' || c == '/' || c == '²' || c == '^';
    }
}
