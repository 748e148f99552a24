package byre.notify;

/** Why a delivery attempt failed, as a metrics tag. */
public enum FailureReason {
    DNS("dns"), REFUSED("refused"), TIMEOUT("timeout"), TLS("tls"), HTTP_STATUS("http-status"), SMTP_REPLY("smtp-reply"),
    EXIT_CODE("exit-code"), NOT_CONNECTED("not-connected"), IO("io"), CONFIG("config");

    private final String tag;

    FailureReason(String tag) {
        this.tag = tag;
    }

    public String tag() {
        return tag;
    }
}
