package byre.mqtt;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ResourceBundle;
import org.eclipse.paho.client.mqttv3.logging.Logger;
import org.eclipse.paho.client.mqttv3.logging.LoggerFactory;
import org.junit.jupiter.api.Test;

class PahoLogTest {
    @Test
    void catalogNumbersBecomeTheClientsTextAndTraceLevelsAreOff() {
        PahoLog log = new PahoLog();
        log.initialise(ResourceBundle.getBundle(LoggerFactory.MQTT_CLIENT_MSG_CAT), "test", null);
        // Entry 101 of the client's own message catalog (logcat.properties in the Paho jar).
        assertEquals("<init> ClientID=byre-1 ServerURI=tcp://127.0.0.1:1883 PersistenceType=null",
                log.formatMessage("101", new Object[] {"byre-1", "tcp://127.0.0.1:1883", null}));
        assertEquals("no such entry", log.formatMessage("no such entry", null));
        assertTrue(log.isLoggable(Logger.SEVERE));
        assertTrue(log.isLoggable(Logger.WARNING));
        // Fine levels carry connection options, the password among them (catalog entry 103): never logged.
        assertFalse(log.isLoggable(Logger.FINE));
        assertFalse(log.isLoggable(Logger.FINEST));
    }
}
