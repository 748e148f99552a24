package byre.daemon;

/**
 * What the daemon's parts say about themselves at one moment, for /health and the systemd watchdog.
 * {@code pipelineIdleMillis} is the time since the pipeline thread last turned its loop (it turns at
 * least every 10 seconds while alive, with or without readings). {@code receiveQuietMillis} is the
 * connected time since the broker last delivered any message, {@code receiveQuietLimitMillis} how long that may
 * be with the configured sensors (0: not checked).
 */
public record HealthSnapshot(boolean brokerConnected, String brokerError, boolean historyHealthy, String historyError,
                             long pipelineIdleMillis, int pipelineQueue, long processed, long historyQueue,
                             long receiveQuietMillis, long receiveQuietLimitMillis) {
    /** Without the receive check. */
    public HealthSnapshot(boolean brokerConnected, String brokerError, boolean historyHealthy, String historyError,
                          long pipelineIdleMillis, int pipelineQueue, long processed, long historyQueue) {
        this(brokerConnected, brokerError, historyHealthy, historyError, pipelineIdleMillis, pipelineQueue, processed, historyQueue, 0, 0);
    }
}
