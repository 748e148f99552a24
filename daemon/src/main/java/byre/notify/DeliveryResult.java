package byre.notify;

/** The outcome of one attempt: success, or a failure with its reason and the exact detail for the operator. */
public record DeliveryResult(boolean ok, FailureReason reason, String detail) {
    public static DeliveryResult success(String detail) {
        return new DeliveryResult(true, null, detail);
    }

    public static DeliveryResult failure(FailureReason reason, String detail) {
        return new DeliveryResult(false, reason, detail);
    }

    @Override
    public String toString() {
        return ok ? "ok" + (detail == null ? "" : ": " + detail) : reason.tag() + ": " + detail;
    }

    /** The first {@code max} characters of a reply body, on one line, for error messages. */
    static String excerpt(String s, int max) {
        if (s == null) return "";
        String one = s.replaceAll("\\s+", " ").strip();
        return one.length() <= max ? one : one.substring(0, max) + "…";
    }
}
