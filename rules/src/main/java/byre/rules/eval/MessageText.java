package byre.rules.eval;

import byre.rules.Watch;
import byre.units.Dimension;
import byre.units.Quantity;
import byre.units.Unit;
import java.util.Locale;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/** Fills a message template ({@code message} or {@code clear message}): {watch} {zone} {quantity} {value} {unit} {level} {since} {site}. */
public final class MessageText {
    private static final Pattern P = Pattern.compile("\\{([a-z]+)\\}");

    private MessageText() {}

    /** Value with one decimal in the display unit; "n/a" when there is none. */
    public static String value(double canonical, Unit display) {
        if (Double.isNaN(canonical)) return "n/a";
        String s = String.format(Locale.ROOT, "%.1f", display.fromCanonical(canonical));
        return s.equals("-0.0") ? "0.0" : s;
    }

    /** The unit values are shown in: the canonical one, or with {@code us} F for temperatures and mph for speeds. */
    public static Unit displayUnit(Quantity q, boolean us) {
        if (us && q.dimension() == Dimension.TEMPERATURE) return Unit.F;
        if (us && q.dimension() == Dimension.SPEED) return Unit.MPH;
        return q.canonicalUnit();
    }

    static String render(String template, Watch w, String zone, Unit display, double value, String site, String since) {
        if (display.symbol().isEmpty()) template = template.replace(" {unit}", "");
        Matcher m = P.matcher(template);
        StringBuilder sb = new StringBuilder();
        while (m.find()) {
            String rep;
            switch (m.group(1)) {
                case "watch": rep = w.name(); break;
                case "zone": rep = zone; break;
                case "quantity": rep = w.quantity().id(); break;
                case "value": rep = value(value, display); break;
                case "unit": rep = display.symbol(); break;
                case "level": rep = w.level().id(); break;
                case "since": rep = since; break;
                case "site": rep = site; break;
                default: rep = m.group(); break;
            }
            m.appendReplacement(sb, Matcher.quoteReplacement(rep));
        }
        m.appendTail(sb);
        return sb.toString();
    }
}
