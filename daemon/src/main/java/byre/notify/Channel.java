package byre.notify;

import byre.alerts.AlertEvent;

/** One configured way to reach people. {@link #deliver} makes one attempt and never throws. */
public interface Channel {
    String name();

    String type();

    DeliveryResult deliver(AlertEvent event);
}
