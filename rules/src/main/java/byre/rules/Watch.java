package byre.rules;

import byre.rules.eval.Plan;
import byre.units.Quantity;
import java.time.Duration;
import java.util.List;
import java.util.Optional;

/**
 * One checked watch, ready for the engine. The accessors are what the daemon's alert stage needs
 * to deliver, remind and escalate; the conditions are for the engine.
 */
public final class Watch {
    /** The message used when a watch has no {@code message} line. */
    public static final String DEFAULT_MESSAGE = "{watch} in {zone}: {quantity} {value} {unit}";

    private final String name;
    private final String file;
    private final int line;
    private final Level level;
    private final List<String> notify;
    private final Duration remindEvery;
    private final Duration escalateAfter;
    private final List<String> escalateTo;
    private final String messageTemplate;
    private final String clearMessageTemplate;
    private final TimeWindow onlyBetween;
    private final List<String> zones;
    private final Duration raiseHold;
    private final Duration clearHold;
    private final boolean hasClearCondition;
    private final Quantity quantity;
    private final Plan.Cond raise;
    private final Plan.Cond clear;

    Watch(String name, String file, int line, Level level, List<String> notify, Duration remindEvery, Duration escalateAfter,
          List<String> escalateTo, String messageTemplate, String clearMessageTemplate, TimeWindow onlyBetween, List<String> zones, Duration raiseHold,
          Duration clearHold, Quantity quantity, Plan.Cond raise, Plan.Cond clear) {
        this.name = name;
        this.file = file;
        this.line = line;
        this.level = level;
        this.notify = List.copyOf(notify);
        this.remindEvery = remindEvery;
        this.escalateAfter = escalateAfter;
        this.escalateTo = List.copyOf(escalateTo);
        this.messageTemplate = messageTemplate;
        this.clearMessageTemplate = clearMessageTemplate;
        this.onlyBetween = onlyBetween;
        this.zones = List.copyOf(zones);
        this.raiseHold = raiseHold;
        this.clearHold = clearHold;
        this.hasClearCondition = clear != null;
        this.quantity = quantity;
        this.raise = raise;
        this.clear = clear;
    }

    public String name() { return name; }

    /** File and line of the {@code watch} line, for log messages. */
    public String origin() { return file + ":" + line; }

    public Level level() { return level; }

    /** Channels of the {@code notify} lines, in order. */
    public List<String> notifyChannels() { return notify; }

    public Optional<Duration> remindEvery() { return Optional.ofNullable(remindEvery); }

    public Optional<Duration> escalateAfter() { return Optional.ofNullable(escalateAfter); }

    /** Channels of {@code escalate after ... to ...}; empty when there is no escalation. */
    public List<String> escalateTo() { return escalateTo; }

    /** The {@code message} text with its placeholders, or {@link #DEFAULT_MESSAGE}. */
    public String messageTemplate() { return messageTemplate; }

    /** The {@code clear message} text with its placeholders; empty when the watch has none (the all-clear then says what ended). */
    public Optional<String> clearMessageTemplate() { return Optional.ofNullable(clearMessageTemplate); }

    /** True when the watch has its own {@code message} line (not {@link #DEFAULT_MESSAGE}). */
    public boolean hasOwnMessage() { return !DEFAULT_MESSAGE.equals(messageTemplate); }

    public Optional<TimeWindow> onlyBetween() { return Optional.ofNullable(onlyBetween); }

    /** One independent alert instance per zone listed here. */
    public List<String> zones() { return zones; }

    public Duration raiseHold() { return raiseHold; }

    /** The clear hold: from {@code clear when ... for}, or the raise hold when there is no clear line. */
    public Duration clearHold() { return clearHold; }

    public boolean hasClearCondition() { return hasClearCondition; }

    /** Quantity of the first term of the raise condition (events carry it). */
    public Quantity quantity() { return quantity; }

    public Plan.Cond raiseCondition() { return raise; }

    /** Null when the watch has no {@code clear when} line. */
    public Plan.Cond clearCondition() { return clear; }

    /**
     * True when {@code other} is this watch as written, wherever it sits in its file: the same name, conditions,
     * holds, level, channels, reminders, escalation, time window and messages. A reload carries the running
     * state and hold timers of such a watch over; the zones are compared per instance by the engine.
     */
    public boolean sameDefinition(Watch other) {
        return other != null && name.equals(other.name) && level == other.level && notify.equals(other.notify)
                && java.util.Objects.equals(remindEvery, other.remindEvery) && java.util.Objects.equals(escalateAfter, other.escalateAfter)
                && escalateTo.equals(other.escalateTo) && java.util.Objects.equals(messageTemplate, other.messageTemplate)
                && java.util.Objects.equals(clearMessageTemplate, other.clearMessageTemplate) && java.util.Objects.equals(onlyBetween, other.onlyBetween) && raiseHold.equals(other.raiseHold)
                && clearHold.equals(other.clearHold) && hasClearCondition == other.hasClearCondition && quantity == other.quantity
                && raise.equals(other.raise) && java.util.Objects.equals(clear, other.clear);
    }

    @Override
    public String toString() { return "watch " + name + " (" + origin() + ")"; }
}
