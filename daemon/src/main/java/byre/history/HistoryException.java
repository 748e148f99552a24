package byre.history;

/** A history database problem, with a message meant for the operator (file name and what to do). */
public final class HistoryException extends RuntimeException {
    public HistoryException(String message) { super(message); }

    public HistoryException(String message, Throwable cause) { super(message, cause); }
}
