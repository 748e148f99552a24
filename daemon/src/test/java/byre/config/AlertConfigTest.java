package byre.config;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.notify.WebhookChannel;
import byre.testing.Configs;
import java.nio.file.Path;
import java.time.Duration;
import java.time.LocalTime;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/** The digest:, self-alerts: and channel keys the alerting adds. */
class AlertConfigTest {
    @TempDir
    Path dir;

    static final String CHANNELS = """
            site: larkmoor
            notify:
              night-phone: { type: webhook, url: "https://push.larkmoor.test/hook", rate-limit: 6, give-up: 12h, timeout: 5s, headers: { X-Farm: larkmoor } }
              office: { type: email, smtp: "mail.larkmoor.test:587", from: byre@larkmoor.test, to: [office@larkmoor.test], tls: starttls }
            """;

    ByreConfig parse(String text) throws ConfigException {
        return Configs.parse("byre.yaml", text, dir, name -> null);
    }

    @Test
    void digestAndSelfAlertsAreRead() throws Exception {
        ByreConfig c = parse(CHANNELS + """
                digest: { at: "07:00", notify: [office] }
                self-alerts: { notify: [night-phone, office], channel-failing-after: 30m }
                """);
        assertEquals(LocalTime.of(7, 0), c.alerts().digestAt());
        assertEquals(List.of("office"), c.alerts().digestNotify());
        assertEquals(List.of("night-phone", "office"), c.alerts().selfAlertNotify());
        assertEquals(Duration.ofMinutes(30), c.alerts().channelFailingAfter());
        assertEquals(6, c.channels().get("night-phone").rateLimit());
        assertEquals(Duration.ofHours(12), c.channels().get("night-phone").giveUp());
    }

    @Test
    void withoutTheSectionsNoDigestAndSelfAlertsGoEverywhere() throws Exception {
        ByreConfig c = parse(CHANNELS);
        assertNull(c.alerts().digestAt());
        assertEquals(List.of("night-phone", "office"), c.alerts().selfAlertNotify());
        assertEquals(AlertSettings.DEFAULT_CHANNEL_FAILING_AFTER, c.alerts().channelFailingAfter());
    }

    @ParameterizedTest(name = "{0}")
    @CsvSource(delimiter = '|', textBlock = """
            digest time       | digest: { at: "7 o'clock", notify: [office] }        | byre.yaml:5:15: digest.at must be a time of day HH:MM such as 07:00, not '7 o'clock'
            digest channel    | digest: { at: "07:00", notify: [ofice] }             | byre.yaml:5:33: digest.notify names unknown channel 'ofice' (did you mean 'office'?)
            digest key        | digest: { at: "07:00", notfy: [office] }             | byre.yaml:5:24: unknown key 'notfy' in digest (did you mean 'notify'?)
            self channel      | self-alerts: { notify: [night-phon] }                | byre.yaml:5:25: self-alerts.notify names unknown channel 'night-phon' (did you mean 'night-phone'?)
            self duration     | self-alerts: { channel-failing-after: soon }         | byre.yaml:5:39: self-alerts.channel-failing-after must be a duration such as 30s, 20m, 2h, 14d or 5y, not 'soon'
            rate limit        | notify:\\n  x: { type: mqtt, topic: a/b, rate-limit: lots } | byre.yaml:5:44: x.rate-limit must be a whole number, not 'lots'
            tls word          | notify:\\n  x: { type: email, smtp: "h:25", from: a@b, to: c@d, tls: startls } | byre.yaml:5:60: x.tls must be starttls, implicit or none, not 'startls' (did you mean 'starttls'?)
            argv not a list   | notify:\\n  x: { type: command, argv: "/bin/send sms" } | byre.yaml:5:29: x.argv must be a list such as [/usr/local/bin/send-sms, "+440000000000"] (no shell is used)
            webhook url       | notify:\\n  x: { type: webhook, url: "push.larkmoor.test" } | byre.yaml:5:28: x.url must start with https:// or http://, not 'push.larkmoor.test'
            template typo     | notify:\\n  x: { type: webhook, url: "https://h.test/", template: "{message} {incdent}" } | byre.yaml:5:57: x.template: unknown placeholder '{incdent}' (did you mean '{incident}'?); placeholders are {id} {incident} {event} {site} {watch} {zone} {level} {quantity} {value} {unit} {since} {at} {message} {by}
            """)
    void problemsNameFileLineAndColumn(String name, String yaml, String expected) {
        // a second notify: would be a duplicate key, so channel snippets join the first section (line 5 either way)
        String text = yaml.startsWith("notify:") ? CHANNELS + "  " + yaml.substring(yaml.indexOf("\\n") + 2).strip() + "\n"
                : CHANNELS + yaml + "\n";
        try {
            parse(text);
            throw new AssertionError("no problem reported for " + name);
        } catch (ConfigException e) {
            List<String> got = e.problems().stream().map(Object::toString).toList();
            assertTrue(got.stream().anyMatch(p -> p.startsWith(expected)), () -> "expected " + expected + "\n got " + got);
        }
    }

    @Test
    void aTemplateWithKnownPlaceholdersAndJsonBracesIsAccepted() throws Exception {
        ByreConfig c = parse(CHANNELS.replace("rate-limit: 6,", "rate-limit: 6, template: '{\"text\":\"{message}\",\"id\":\"{incident}\"}',"));
        assertEquals("{\"text\":\"{message}\",\"id\":\"{incident}\"}", c.channels().get("night-phone").settings(WebhookChannel.Settings.class).template());
    }
}
