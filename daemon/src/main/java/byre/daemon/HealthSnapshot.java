package byre.daemon;

/**
 * What the daemon's parts say about themselves at one moment, for /health and the systemd watchdog.
 * {@code pipelineIdleMillis} is the time since the pipeline thread last turned its loop (it turns at
 * least four times a second while alive, with or without readings).
 */
public record HealthSnapshot(boolean brokerConnected, String brokerError, boolean historyHealthy, String historyError,
                             long pipelineIdleMillis, int pipelineQueue, long processed, long historyQueue) {
}
