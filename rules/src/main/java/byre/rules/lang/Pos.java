package byre.rules.lang;

/** Where a node starts in its file: 1-based line and column, and how many characters it spans. */
public record Pos(int line, int col, int len) {
}
