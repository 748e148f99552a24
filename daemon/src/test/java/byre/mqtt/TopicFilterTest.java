package byre.mqtt;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/** Topic filter matching as MQTT 3.1.1 section 4.7 describes it, with its own examples and byre's topics. */
class TopicFilterTest {
    @ParameterizedTest(name = "{0} ~ {1}: {2}")
    @CsvSource(delimiter = '|', value = {
        // exact filters: every level equal, the same number of levels
        "larkmoor/calf-barn/pen1/dry | larkmoor/calf-barn/pen1/dry  | true",
        "larkmoor/calf-barn/pen1/dry | larkmoor/calf-barn/pen2/dry  | false",
        "larkmoor/calf-barn/pen1     | larkmoor/calf-barn/pen1/dry  | false",
        "larkmoor/calf-barn/pen1/dry | larkmoor/calf-barn/pen1      | false",
        "larkmoor/Calf-barn          | larkmoor/calf-barn           | false",
        // '+' is exactly one level, which may be empty
        "larkmoor/hutches/+/dry      | larkmoor/hutches/h7/dry      | true",
        "larkmoor/hutches/+/dry      | larkmoor/hutches//dry        | true",
        "larkmoor/hutches/+/dry      | larkmoor/hutches/h7/wet      | false",
        "larkmoor/hutches/+/dry      | larkmoor/hutches/a/b/dry     | false",
        "larkmoor/hutches/+          | larkmoor/hutches             | false",
        "larkmoor/hutches/+          | larkmoor/hutches/            | true",
        "+/+                         | /finance                     | true",
        "/+                          | /finance                     | true",
        "+                           | /finance                     | false",
        // '#' is the rest, including none of it (the parent level itself)
        "larkmoor/cow-shed/#         | larkmoor/cow-shed            | true",
        "larkmoor/cow-shed/#         | larkmoor/cow-shed/east/thi   | true",
        "larkmoor/cow-shed/#         | larkmoor/calf-barn/pen1      | false",
        "larkmoor/+/pen1/#           | larkmoor/calf-barn/pen1/dry  | true",
        "#                           | larkmoor/calf-barn/pen1/dry  | true",
        // section 4.7.2: a filter starting with a wildcard does not match a topic starting with '$'
        "#                           | $SYS/broker/clients/total    | false",
        "+/broker/clients/total      | $SYS/broker/clients/total    | false",
        "+/+                         | $SYS/uptime                  | false",
        "+                           | $SYS                         | false",
        "#                           | $larkmoor                    | false",
        "$SYS/#                      | $SYS/broker/clients/total    | true",
        "$SYS/+/clients/total        | $SYS/broker/clients/total    | true",
        "$SYS                        | $SYS                         | true",
        // only a topic beginning with '$' is the broker's; a '$' further in is an ordinary character
        "#                           | larkmoor/$SYS/uptime         | true",
        "+/+/uptime                  | larkmoor/$SYS/uptime         | true",
        "+/+                         | /$SYS                        | true",
        "#                           | larkmoor$/dry                | true",
    })
    void matchesAsTheStandardSays(String filter, String topic, boolean expected) {
        assertEquals(expected, TopicFilter.matches(TopicFilter.levels(filter), TopicFilter.levels(topic)));
    }

    @Test
    void levelsKeepEmptyOnes() {
        assertArrayEquals(new String[] {"", "larkmoor", "", "dry", ""}, TopicFilter.levels("/larkmoor//dry/"));
        assertArrayEquals(new String[] {"larkmoor"}, TopicFilter.levels("larkmoor"));
    }
}
