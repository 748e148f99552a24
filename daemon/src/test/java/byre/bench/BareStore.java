package byre.bench;

import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.PreparedStatement;
import java.sql.Statement;
import java.util.UUID;
import org.eclipse.paho.client.mqttv3.MqttClient;
import org.eclipse.paho.client.mqttv3.MqttConnectOptions;
import org.eclipse.paho.client.mqttv3.persist.MemoryPersistence;

/**
 * The start-up baseline of {@link StartupBench}: the least a JVM program on byre's libraries does to store a reading.
 * It opens an SQLite file (WAL) with one table, connects a bare Paho client, subscribes to one topic at QoS 1, and
 * stores each message's payload with its arrival time (one commit each), printing {@code stored} after the first.
 * Usage: {@code BareStore tcp://host:port topic file.db}; runs until killed.
 */
public final class BareStore {
    public static void main(String[] args) throws Exception {
        Connection db = DriverManager.getConnection("jdbc:sqlite:" + args[2]);
        try (Statement st = db.createStatement()) {
            st.execute("PRAGMA journal_mode=WAL");
            st.execute("CREATE TABLE IF NOT EXISTS reading(topic TEXT NOT NULL, ts INTEGER NOT NULL, payload BLOB, PRIMARY KEY (topic, ts)) WITHOUT ROWID");
        }
        PreparedStatement insert = db.prepareStatement("INSERT OR IGNORE INTO reading VALUES (?, ?, ?)");
        MqttClient c = new MqttClient(args[0], "bench-store-" + UUID.randomUUID().toString().substring(0, 8), new MemoryPersistence());
        MqttConnectOptions o = new MqttConnectOptions();
        o.setCleanSession(true);
        c.connect(o);
        boolean[] first = {true};
        c.subscribe(args[1], 1, (topic, msg) -> {
            synchronized (insert) {
                insert.setString(1, topic);
                insert.setLong(2, System.currentTimeMillis());
                insert.setBytes(3, msg.getPayload());
                insert.executeUpdate();
                if (first[0]) {
                    first[0] = false;
                    System.out.println("stored");
                    System.out.flush();
                }
            }
        });
        Thread.sleep(Long.MAX_VALUE);
    }
}
