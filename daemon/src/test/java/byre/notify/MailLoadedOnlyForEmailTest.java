package byre.notify;

import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import byre.config.ByreConfig;
import byre.config.ChannelConfig;
import byre.testing.Configs;
import java.io.File;
import java.net.URL;
import java.net.URLClassLoader;
import java.nio.file.Path;
import java.time.ZoneOffset;
import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** Jakarta Mail is loaded only when an email channel is configured: without one, start-up touches none of its classes. */
class MailLoadedOnlyForEmailTest {
    @TempDir
    Path dir;

    /** Loads everything afresh from the test's class path, and says which classes it loaded. */
    static final class Fresh extends URLClassLoader {
        Fresh() throws Exception {
            super(classPath(), ClassLoader.getPlatformClassLoader());
        }

        boolean loaded(String name) {
            return findLoadedClass(name) != null;
        }

        private static URL[] classPath() throws Exception {
            List<URL> urls = new ArrayList<>();
            for (String p : System.getProperty("java.class.path").split(File.pathSeparator)) urls.add(Path.of(p).toUri().toURL());
            return urls.toArray(URL[]::new);
        }
    }

    /** What start-up does with channels: read the configuration, build every channel. Run inside {@link Fresh}. */
    public static final class StartUp {
        public static void run(String yaml, String dir) throws Exception {
            ByreConfig c = Configs.parse("byre.yaml", yaml, Path.of(dir), n -> null);
            ChannelFactory f = new ChannelFactory(null, ZoneOffset.UTC);
            for (ChannelConfig cc : c.channels().values()) f.build(cc);
        }
    }

    boolean startUpLoadsMail(String notify) throws Exception {
        try (Fresh loader = new Fresh()) {
            loader.loadClass(StartUp.class.getName()).getMethod("run", String.class, String.class)
                    .invoke(null, "site: larkmoor\nnotify:\n" + notify, dir.toString());
            assertTrue(loader.loaded(ChannelTypes.class.getName()), "the channel kinds were loaded in the fresh loader");
            return loader.loaded("jakarta.mail.Session") || loader.loaded("org.eclipse.angus.mail.smtp.SMTPTransport")
                    || loader.loaded("jakarta.mail.Message");
        }
    }

    @Test
    void withoutAnEmailChannelNoMailClassIsLoaded() throws Exception {
        assertFalse(startUpLoadsMail("""
                  night-phone: { type: webhook, url: "https://push.larkmoor.test/hook" }
                  barn-siren: { type: mqtt, topic: larkmoor/siren/set }
                  pager: { type: command, argv: [/bin/true] }
                """));
    }

    @Test
    void anEmailChannelLoadsItWhenItSends() throws Exception {
        // building alone loads nothing either; the first delivery does (here it fails: nothing listens on port 9)
        assertFalse(startUpLoadsMail("  office: { type: email, smtp: \"127.0.0.1:9\", from: byre@larkmoor.test, to: office@larkmoor.test, tls: none }\n"));
        try (Fresh loader = new Fresh()) {
            // Jakarta Mail finds its parts through the thread's context class loader
            Thread.currentThread().setContextClassLoader(loader);
            try {
                loader.loadClass(Deliver.class.getName()).getMethod("run").invoke(null);
            } finally {
                Thread.currentThread().setContextClassLoader(MailLoadedOnlyForEmailTest.class.getClassLoader());
            }
            assertTrue(loader.loaded("jakarta.mail.Session"));
        }
    }

    public static final class Deliver {
        public static void run() {
            new EmailChannel("office", new EmailChannel.Settings("127.0.0.1", 9, EmailChannel.Tls.NONE, "byre@larkmoor.test",
                    List.of("office@larkmoor.test"), null, null, java.time.Duration.ofSeconds(2)), new MessageText(ZoneOffset.UTC), null)
                    .deliver(EmailChannelTest.EVENT);
        }
    }
}
