package byre.rules;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.List;
import org.junit.jupiter.api.Test;

class SmokeTest {
    @Test
    void heat() {
        Scenario s = new Scenario("""
                watch heat-stress
                  raise when cows.thi >= 72 for 30m
                  clear when cows.thi <= 70 for 20m
                  notify night-phone
                """, Scenario.farm());
        List<String> out = s.run("""
                10:00 cows thi 73
                10:10 cows thi 74
                10:20 cows thi 73
                10:29 cows thi 73
                10:40 cows thi 69
                11:00 cows thi 69
                11:10 cows thi 69
                """);
        assertEquals(List.of("10:30 RAISED heat-stress/cows 73.0", "11:00 CLEARED heat-stress/cows 69.0"), out);
    }
}
