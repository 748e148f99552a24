package byre.climate;

import static org.junit.jupiter.api.Assertions.assertEquals;

import byre.units.Quantity;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.EnumMap;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/** The README's "What each stream needs" table says what the recipe table says, for every quantity and THI form. */
class ReadmeNeedsTest {
    @Test
    void theReadmeTableIsTheRecipeTable() throws Exception {
        List<String> lines = Files.readAllLines(Path.of("..", "README.md"));
        int header = lines.indexOf("| stream | needs |");
        Map<Quantity, String> readme = new EnumMap<>(Quantity.class);
        for (int i = header + 2; i < lines.size() && lines.get(i).startsWith("|"); i++) {
            String[] cells = lines.get(i).split("\\|");
            for (String id : cells[1].split(",")) readme.put(Quantity.byId(id.trim().replace("`", "")).orElseThrow(), cells[2].trim());
        }
        Map<Quantity, String> table = new EnumMap<>(Quantity.class);
        for (Quantity q : Quantity.values()) {
            String nrc = Derivable.needsText(q, ThiVariant.NRC_1971);
            List<String> parts = new ArrayList<>(List.of(nrc));
            for (ThiVariant v : ThiVariant.values()) {
                String other = Derivable.needsText(q, v);
                if (!other.equals(nrc)) parts.add("with `thi: " + v.id() + "`: " + other);
            }
            table.put(q, String.join("; ", parts));
        }
        assertEquals(table, readme);
    }
}
