package byre.ingest;

/** Why a payload was not turned into a reading; the id is the metrics tag and the log word. */
public enum RejectReason {
    TOO_LARGE("too-large", "payload larger than 4 KiB"),
    UNPARSEABLE("unparseable", "payload is not in the configured form"),
    MISSING_FIELD("missing-field", "the configured field is not in the payload"),
    NOT_FINITE("not-finite", "value is NaN or infinite"),
    OUT_OF_RANGE("out-of-range", "value outside the plausible range of its quantity"),
    BAD_UNIT("bad-unit", "payload names a unit that does not fit the quantity"),
    FLOOD("flood", "sensor sends faster than the per-sensor limit"),
    ID_LIMIT("id-limit", "a new id in a wildcard family that already has its max-ids distinct ids");

    private final String id;
    private final String description;

    RejectReason(String id, String description) {
        this.id = id;
        this.description = description;
    }

    public String id() { return id; }

    public String description() { return description; }
}
