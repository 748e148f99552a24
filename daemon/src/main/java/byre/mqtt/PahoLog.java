package byre.mqtt;

import java.text.MessageFormat;
import java.util.MissingResourceException;
import java.util.ResourceBundle;
import org.eclipse.paho.client.mqttv3.logging.Logger;
import org.slf4j.LoggerFactory;

/**
 * The MQTT client's own log, into byre's log: its warnings and errors appear with byre's other lines (not
 * in java.util.logging's format on stderr), and its trace calls, made several times for every message
 * received, cost an empty call instead of a trip through java.util.logging. Installed by {@link #install()}
 * before the client's classes load.
 */
public final class PahoLog implements Logger {
    private static final org.slf4j.Logger LOG = LoggerFactory.getLogger("byre.mqtt.paho");
    private ResourceBundle catalog;

    /** Makes the client log through this class; call before any client class is used. */
    public static void install() {
        org.eclipse.paho.client.mqttv3.logging.LoggerFactory.setLogger(PahoLog.class.getName());
    }

    @Override
    public void initialise(ResourceBundle messageCatalog, String loggerId, String resourceName) {
        this.catalog = messageCatalog;
    }

    @Override
    public void setResourceName(String logContext) {}

    @Override
    public boolean isLoggable(int level) {
        return level <= INFO && (level != INFO || LOG.isDebugEnabled());
    }

    @Override
    public void severe(String sourceClass, String sourceMethod, String msg) { severe(sourceClass, sourceMethod, msg, null, null); }

    @Override
    public void severe(String sourceClass, String sourceMethod, String msg, Object[] inserts) { severe(sourceClass, sourceMethod, msg, inserts, null); }

    @Override
    public void severe(String sourceClass, String sourceMethod, String msg, Object[] inserts, Throwable thrown) {
        LOG.error("{}: {}", shortName(sourceClass), formatMessage(msg, inserts), thrown);
    }

    @Override
    public void warning(String sourceClass, String sourceMethod, String msg) { warning(sourceClass, sourceMethod, msg, null, null); }

    @Override
    public void warning(String sourceClass, String sourceMethod, String msg, Object[] inserts) { warning(sourceClass, sourceMethod, msg, inserts, null); }

    @Override
    public void warning(String sourceClass, String sourceMethod, String msg, Object[] inserts, Throwable thrown) {
        LOG.warn("{}: {}", shortName(sourceClass), formatMessage(msg, inserts), thrown);
    }

    // The client's "info" is chatty connection detail: byre logs its own connection lines, so these go to debug.
    @Override
    public void info(String sourceClass, String sourceMethod, String msg) { info(sourceClass, sourceMethod, msg, null, null); }

    @Override
    public void info(String sourceClass, String sourceMethod, String msg, Object[] inserts) { info(sourceClass, sourceMethod, msg, inserts, null); }

    @Override
    public void info(String sourceClass, String sourceMethod, String msg, Object[] inserts, Throwable thrown) {
        if (LOG.isDebugEnabled()) LOG.debug("{}: {}", shortName(sourceClass), formatMessage(msg, inserts), thrown);
    }

    @Override
    public void config(String sourceClass, String sourceMethod, String msg) {}

    @Override
    public void config(String sourceClass, String sourceMethod, String msg, Object[] inserts) {}

    @Override
    public void config(String sourceClass, String sourceMethod, String msg, Object[] inserts, Throwable thrown) {}

    @Override
    public void fine(String sourceClass, String sourceMethod, String msg) {}

    @Override
    public void fine(String sourceClass, String sourceMethod, String msg, Object[] inserts) {}

    @Override
    public void fine(String sourceClass, String sourceMethod, String msg, Object[] inserts, Throwable thrown) {}

    @Override
    public void finer(String sourceClass, String sourceMethod, String msg) {}

    @Override
    public void finer(String sourceClass, String sourceMethod, String msg, Object[] inserts) {}

    @Override
    public void finer(String sourceClass, String sourceMethod, String msg, Object[] inserts, Throwable thrown) {}

    @Override
    public void finest(String sourceClass, String sourceMethod, String msg) {}

    @Override
    public void finest(String sourceClass, String sourceMethod, String msg, Object[] inserts) {}

    @Override
    public void finest(String sourceClass, String sourceMethod, String msg, Object[] inserts, Throwable thrown) {}

    @Override
    public void log(int level, String sourceClass, String sourceMethod, String msg, Object[] inserts, Throwable thrown) {
        switch (level) {
            case SEVERE: severe(sourceClass, sourceMethod, msg, inserts, thrown); break;
            case WARNING: warning(sourceClass, sourceMethod, msg, inserts, thrown); break;
            case INFO: info(sourceClass, sourceMethod, msg, inserts, thrown); break;
            default: break;
        }
    }

    @Override
    public void trace(int level, String sourceClass, String sourceMethod, String msg, Object[] inserts, Throwable thrown) {}

    /** The client logs catalog numbers ("208") with inserts; the catalog turns them into text. */
    @Override
    public String formatMessage(String msg, Object[] inserts) {
        String text = msg;
        if (catalog != null && msg != null) {
            try {
                text = catalog.getString(msg);
            } catch (MissingResourceException e) {
                text = msg;
            }
        }
        if (inserts == null || inserts.length == 0 || text == null) return text;
        try {
            return MessageFormat.format(text, inserts);
        } catch (IllegalArgumentException e) {
            return text + " " + java.util.Arrays.toString(inserts);
        }
    }

    @Override
    public void dumpTrace() {}

    private static String shortName(String className) {
        if (className == null) return "mqtt client";
        int dot = className.lastIndexOf('.');
        return dot < 0 ? className : className.substring(dot + 1);
    }
}
