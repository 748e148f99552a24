package byre.climate;

import byre.units.Quantity;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collection;
import java.util.EnumMap;
import java.util.EnumSet;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.Set;
import java.util.stream.Collectors;

/**
 * What the {@link Recipe} table makes of a set of measured quantities: the streams a zone can ever
 * have, and for one it cannot have, which sensors it lacks. {@code byre check}, reloads and
 * {@code byre calc} ask here; the derivation runs the same table, so they agree by construction.
 */
public final class Derivable {
    private Derivable() {}

    /** What {@link Quantity#ONLINE} needs: it is not climate, and only a central byre's site zones have it. */
    public static final String ONLY_SITE_ZONES = "a site's own zone on a central byre (`central:`)";

    /** The quantities a sensor may measure. */
    public static final Set<Quantity> MEASURED;

    /** Per THI form and quantity: what the quantity needs, as groups of measured quantities (one of each). */
    private static final Map<ThiVariant, Map<Quantity, List<Set<Quantity>>>> NEEDS = new EnumMap<>(ThiVariant.class);
    /** Per THI form and quantity: {@link #needsText}. */
    private static final Map<ThiVariant, Map<Quantity, String>> NEEDS_TEXT = new EnumMap<>(ThiVariant.class);

    static {
        Set<Quantity> m = EnumSet.noneOf(Quantity.class);
        for (Quantity q : Quantity.values()) if (q.measurable()) m.add(q);
        MEASURED = java.util.Collections.unmodifiableSet(m);
        for (ThiVariant v : ThiVariant.values()) {
            Map<Quantity, List<Set<Quantity>>> byQuantity = new EnumMap<>(Quantity.class);
            Map<Quantity, String> text = new EnumMap<>(Quantity.class);
            for (Quantity q : Quantity.values()) {
                byQuantity.put(q, q.climate() ? groups(q, v, null) : List.of());
                if (!q.climate()) text.put(q, ONLY_SITE_ZONES);
                else if (!hasRecipe(q)) text.put(q, "its own sensor");
                else if (q.measurable()) text.put(q, "its own sensor, or " + groupsText(groups(q, v, q)));
                else text.put(q, groupsText(byQuantity.get(q)));
            }
            NEEDS.put(v, byQuantity);
            NEEDS_TEXT.put(v, text);
        }
    }

    /**
     * Every stream a zone whose sensors measure {@code measured} can have: those quantities, and each
     * one a recipe of the zone's THI form gives from them (one pass in table order, as the derivation).
     */
    public static Set<Quantity> streams(Collection<Quantity> measured, ThiVariant variant) {
        Set<Quantity> have = EnumSet.noneOf(Quantity.class);
        for (Quantity q : measured) if (q.measurable()) have.add(q);
        for (Recipe r : Recipe.ALL) {
            if (r.appliesTo(variant) && !have.contains(r.quantity()) && have.containsAll(r.inputs())) have.add(r.quantity());
        }
        return have;
    }

    /**
     * What {@code q} needs in measured quantities: each group needs one of its members (its sensor, or
     * for a derived quantity one way of getting it). Groups and members in quantity order.
     */
    public static List<Set<Quantity>> needs(Quantity q, ThiVariant variant) {
        return NEEDS.get(variant).get(q);
    }

    /** The groups of {@link #needs} that {@code measured} has no member of; empty when the zone can have {@code q}. */
    public static List<Set<Quantity>> unmet(Quantity q, Collection<Quantity> measured, ThiVariant variant) {
        List<Set<Quantity>> out = new ArrayList<>();
        for (Set<Quantity> g : needs(q, variant)) if (g.stream().noneMatch(measured::contains)) out.add(g);
        return out;
    }

    /**
     * Why a zone can never have {@code q}: "cow-shed has no air-speed sensor; cci needs dry-bulb, wet-bulb
     * or rh or dew-point, air-speed". Empty when it can.
     */
    public static Optional<String> whyNot(String zone, Quantity q, Collection<Quantity> measured, ThiVariant variant) {
        if (!q.climate()) return Optional.of(zone + " has no " + q.id() + " stream: only " + ONLY_SITE_ZONES.replace("`", "'") + " has one");
        List<Set<Quantity>> missing = unmet(q, measured, variant);
        if (missing.isEmpty()) return Optional.empty();
        StringBuilder sb = new StringBuilder(zone).append(" has ");
        for (int i = 0; i < missing.size(); i++) {
            if (i > 0) sb.append(i == missing.size() - 1 ? " and " : ", ");
            sb.append("no ").append(list(missing.get(i), ", ", " or ")).append(" sensor");
        }
        if (hasRecipe(q)) {
            sb.append("; ").append(q.id());
            if (Arrays.stream(Recipe.ALL).anyMatch(r -> r.quantity() == q && r.variant() != null)) sb.append(" (").append(variant.id()).append(')');
            sb.append(" needs ").append(needsText(q, variant));
        }
        return Optional.of(sb.toString());
    }

    /**
     * What {@code q} needs, for people: "dry-bulb, wet-bulb or rh or dew-point, air-speed" (one of each
     * comma-separated item); "its own sensor, or dry-bulb, wet-bulb or dew-point" for rh, which may be measured.
     */
    public static String needsText(Quantity q, ThiVariant variant) {
        return NEEDS_TEXT.get(variant).get(q);
    }

    private static String groupsText(List<Set<Quantity>> groups) {
        return groups.stream().map(g -> list(g, " or ", " or ")).collect(Collectors.joining(", "));
    }

    /** True when some recipe gives {@code q} (it is not measured only). */
    public static boolean hasRecipe(Quantity q) {
        for (Recipe r : Recipe.ALL) if (r.quantity() == q) return true;
        return false;
    }

    /** The recipes a zone with this THI form uses that read {@code input}, as quantity ids ("wind-chill and cci"). */
    public static String readersOf(Quantity input, ThiVariant variant) {
        Set<Quantity> readers = EnumSet.noneOf(Quantity.class);
        for (Recipe r : Recipe.ALL) if (r.appliesTo(variant) && r.inputs().contains(input)) readers.add(r.quantity());
        return list(readers, ", ", " and ");
    }

    private static String list(Set<Quantity> qs, String sep, String last) {
        List<String> ids = qs.stream().map(Quantity::id).toList();
        if (ids.size() == 1) return ids.get(0);
        return String.join(sep, ids.subList(0, ids.size() - 1)) + last + ids.get(ids.size() - 1);
    }

    /**
     * The needs of {@code q} as the smallest groups G of measured quantities such that, without any sensor
     * of G, the zone cannot have {@code q}: found by trying each subset of the (eight) measured quantities.
     * {@code without}, when not null, is a sensor taken as absent (to state how a measurable quantity is derived).
     */
    private static List<Set<Quantity>> groups(Quantity q, ThiVariant variant, Quantity without) {
        Quantity[] measured = MEASURED.stream().filter(m -> m != without).toArray(Quantity[]::new);
        List<Set<Quantity>> found = new ArrayList<>();
        int all = 1 << measured.length;
        // Smaller groups first, so a group is kept only when no smaller one is part of it.
        Integer[] masks = new Integer[all];
        for (int i = 0; i < all; i++) masks[i] = i;
        Arrays.sort(masks, (a, b) -> Integer.bitCount(a) != Integer.bitCount(b) ? Integer.bitCount(a) - Integer.bitCount(b) : a - b);
        for (int mask : masks) {
            if (mask == 0) continue;
            Set<Quantity> group = EnumSet.noneOf(Quantity.class);
            Set<Quantity> rest = EnumSet.noneOf(Quantity.class);
            for (int i = 0; i < measured.length; i++) ((mask & (1 << i)) != 0 ? group : rest).add(measured[i]);
            if (streams(rest, variant).contains(q)) continue;
            if (found.stream().anyMatch(group::containsAll)) continue;
            found.add(group);
        }
        found.sort((a, b) -> a.iterator().next().ordinal() != b.iterator().next().ordinal()
                ? a.iterator().next().ordinal() - b.iterator().next().ordinal() : a.size() - b.size());
        return List.copyOf(found);
    }
}
