package byre.central;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;

import byre.ingest.Reading;
import byre.testing.Configs;
import byre.testing.MutableClock;
import byre.units.Quantity;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;

/** A site's {@code online} stream from its byre's status (last will) and its bridge's state. */
class SiteLinksTest {
    final MutableClock clock = new MutableClock(Instant.parse("2026-07-14T02:00:00Z"));
    final List<Reading> out = new ArrayList<>();

    SiteLinks links() throws Exception {
        var c = Configs.parse("central.yaml", CentralConfigTest.CENTRAL, Path.of("."), k -> null).central();
        return new SiteLinks(c, "byre", clock, out::add);
    }

    void send(SiteLinks l, String topic, String payload) {
        l.accept(topic, payload.getBytes(StandardCharsets.UTF_8));
    }

    List<Double> values() {
        return out.stream().map(Reading::value).toList();
    }

    @Test
    void onlineWhileTheByreSaysSoAndTheBridgeIsNotKnownToBeDown() throws Exception {
        SiteLinks l = links();
        send(l, "byre/larkmoor/uplink", "1");
        assertNull(l.online("larkmoor"), "the bridge is up, but nothing from the site's byre yet");
        send(l, "byre/larkmoor/status", "online");
        send(l, "byre/larkmoor/status", "online"); // retained again after a reconnect: no change, no reading
        clock.advance(Duration.ofMinutes(1));
        send(l, "byre/larkmoor/uplink", "0");   // the central broker's will for the bridge
        clock.advance(Duration.ofMinutes(1));
        send(l, "byre/larkmoor/uplink", "1");
        send(l, "byre/larkmoor/status", "offline"); // the byre's own will, through the bridge
        send(l, "byre/larkmoor/status", "asleep");  // neither: ignored
        assertEquals(List.of(1.0, 0.0, 1.0, 0.0), values());
        assertEquals("larkmoor/online", out.get(0).sensorId());
        assertEquals(Quantity.ONLINE, out.get(0).quantity());
        assertEquals(Instant.parse("2026-07-14T02:01:00Z"), out.get(1).at(), "stamped with the centre's clock");
        assertEquals(0.0, l.online("larkmoor"));
        assertNull(l.online("brackenhill"));
    }

    @Test
    void aSiteWithoutABridgeIsOnlineByItsStatusAloneAndRefreshKeepsTheStreamFresh() throws Exception {
        SiteLinks l = links();
        send(l, "byre/brackenhill/status", "online");
        send(l, "byre/elsewhere/status", "offline"); // not a listed site
        clock.advance(Duration.ofSeconds(30));
        l.refresh();
        assertEquals(List.of(1.0, 1.0), values());
        assertEquals(List.of("brackenhill/online", "brackenhill/online"), out.stream().map(Reading::sensorId).toList());
        assertEquals(Instant.parse("2026-07-14T02:00:30Z"), out.get(1).at());
    }
}
