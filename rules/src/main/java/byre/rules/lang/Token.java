package byre.rules.lang;

/** One token. {@code number} holds a NUMBER's value, a DURATION's milliseconds or a TIME's minute of day. */
record Token(Kind kind, String text, Pos pos, double number) {
    enum Kind { WORD, NUMBER, DURATION, TIME, STRING, AT, DOT, COMMA, LPAREN, RPAREN, OP, EOL, EOF, BAD }

    boolean is(Kind k) { return kind == k; }

    boolean isWord(String w) { return kind == Kind.WORD && text.equals(w); }

    /** How the token is quoted in messages. */
    String shown() {
        switch (kind) {
            case EOL: return "the end of the line";
            case EOF: return "the end of the file";
            case STRING: return "a string";
            default:
                String t = text.length() > 40 ? text.substring(0, 40) + "..." : text;
                return "'" + t + "'";
        }
    }
}
