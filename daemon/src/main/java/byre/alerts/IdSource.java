package byre.alerts;

import java.security.SecureRandom;
import java.time.Instant;
import java.util.UUID;

/** Makes event ids (unique, time-ordered) and incident ids (short enough to type in {@code byre ack}). */
public interface IdSource {
    String eventId(Instant at);

    String incidentId(Instant at);

    /** Event ids: epoch-ms hex then random bits (sorts by time); incident ids: 10 lower-case base-32 characters. */
    static IdSource random() {
        SecureRandom rnd = new SecureRandom();
        return new IdSource() {
            @Override
            public String eventId(Instant at) {
                UUID u = UUID.randomUUID();
                return String.format("%012x-%016x", at.toEpochMilli(), u.getLeastSignificantBits());
            }

            @Override
            public String incidentId(Instant at) {
                // no 0/1/l/o: read aloud over the phone without mix-ups
                String alphabet = "23456789abcdefghijkmnpqrstuvwxyz";
                StringBuilder sb = new StringBuilder(10);
                for (int i = 0; i < 10; i++) sb.append(alphabet.charAt(rnd.nextInt(alphabet.length())));
                return sb.toString();
            }
        };
    }

    /** Counting ids for tests: e1, e2, ... and i1, i2, ... */
    static IdSource counting() {
        return new IdSource() {
            private long events;
            private long incidents;

            @Override
            public synchronized String eventId(Instant at) {
                return "e" + (++events);
            }

            @Override
            public synchronized String incidentId(Instant at) {
                return "i" + (++incidents);
            }
        };
    }
}
