package byre.mqtt;

import java.io.FilterInputStream;
import java.io.IOException;
import java.io.InputStream;

/**
 * Sits between the socket and the MQTT client and follows the packets going by (MQTT 3.1.1 section 2.2: a type
 * byte, the remaining length, the rest). In every PUBLISH it checks the topic name and overwrites each byte the
 * client would choke on with {@link #MARK}, keeping the packet's length.
 *
 * <p>Why: the client decodes a topic that holds a NUL, another control character, a non-character or bytes that
 * are not UTF-8 by throwing an unchecked exception on its reading thread, which then dies without closing the
 * connection. Nothing more is read until the keep-alive runs out; after the reconnect the broker delivers the
 * same message again, and the thread dies again. A broker should refuse such a topic (MQTT 3.1.1 section 1.5.3),
 * but some forward it. With the mark in place the client delivers the message, and {@link MqttLink} drops it:
 * a topic name never holds a wildcard (section 4.7.1), so {@code #} in a delivered topic can only be this mark
 * (or a broker passing on a topic it should have refused) and the message is counted, logged and acknowledged.
 *
 * <p>The client's reads may time out part-way through a packet and are then repeated; all progress is kept in
 * fields, so a timeout anywhere leaves the stream where it was.
 */
final class PublishTopicGuard extends FilterInputStream {
    /** What replaces a bad byte: a wildcard, which no valid topic name holds. */
    static final byte MARK = '#';

    private static final int TYPE = 0;
    private static final int LENGTH = 1;
    private static final int TOPIC = 2;
    private static final int BODY = 3;

    private int state = TYPE;
    private boolean publish;
    private int lengthShift;
    private long remaining;
    /** The topic's 2-byte length and the topic, read whole before any of it is passed on. */
    private byte[] topic = new byte[256];
    private int topicFilled;
    private int topicEnd;
    private int topicServed;
    private final byte[] one = new byte[1];

    PublishTopicGuard(InputStream in) {
        super(in);
    }

    @Override
    public int read() throws IOException {
        int n = read(one, 0, 1);
        return n <= 0 ? -1 : one[0] & 0xff;
    }

    @Override
    public int read(byte[] b, int off, int len) throws IOException {
        if (len == 0) return 0;
        switch (state) {
            case TYPE: {
                int c = in.read();
                if (c < 0) return -1;
                publish = (c >> 4) == 3;
                lengthShift = 0;
                remaining = 0;
                state = LENGTH;
                b[off] = (byte) c;
                return 1;
            }
            case LENGTH: {
                int c = in.read();
                if (c < 0) return -1;
                remaining |= (long) (c & 0x7f) << lengthShift;
                lengthShift += 7;
                if ((c & 0x80) == 0 || lengthShift >= 28) afterLength();
                b[off] = (byte) c;
                return 1;
            }
            case TOPIC:
                return readTopic(b, off, len);
            case BODY: {
                int n = in.read(b, off, (int) Math.min(len, remaining));
                if (n < 0) return -1;
                remaining -= n;
                if (remaining == 0) state = TYPE;
                return n;
            }
            default:
                throw new IllegalStateException("state " + state);
        }
    }

    private void afterLength() {
        if (remaining == 0) {
            state = TYPE;
        } else if (publish && remaining >= 2) {
            state = TOPIC;
            topicFilled = 0;
            topicEnd = 2;
            topicServed = 0;
        } else {
            state = BODY;
        }
    }

    /** Reads the topic's length and the topic whole, repairs it, then hands it on. */
    private int readTopic(byte[] b, int off, int len) throws IOException {
        while (topicFilled < topicEnd) {
            int n = in.read(topic, topicFilled, topicEnd - topicFilled);
            if (n < 0) return -1;
            topicFilled += n;
            if (topicFilled == 2 && topicEnd == 2) {
                int topicLen = ((topic[0] & 0xff) << 8) | (topic[1] & 0xff);
                // A length beyond the packet is malformed: passed on untouched for the client to refuse.
                if (topicLen + 2L <= remaining) {
                    topicEnd = 2 + topicLen;
                    if (topicEnd > topic.length) topic = java.util.Arrays.copyOf(topic, topicEnd);
                }
            }
        }
        if (topicServed == 0) repair(topic, 2, topicEnd - 2);
        int n = Math.min(len, topicEnd - topicServed);
        System.arraycopy(topic, topicServed, b, off, n);
        topicServed += n;
        if (topicServed == topicEnd) {
            remaining -= topicEnd;
            state = remaining == 0 ? TYPE : BODY;
            if (topic.length > 4096) topic = new byte[256]; // one long topic does not keep a large buffer
        }
        return n;
    }

    /**
     * Overwrites with {@link #MARK} every byte of {@code b[from, from+len)} that is not part of a well-formed UTF-8
     * sequence (RFC 3629: shortest form, no surrogates, at most U+10FFFF) encoding a character the client accepts
     * (not a control character U+0000-U+001F or U+007F-U+009F, not a non-character). Returns how many were overwritten.
     */
    static int repair(byte[] b, int from, int len) {
        int end = from + len;
        int marked = 0;
        int i = from;
        while (i < end) {
            int c = b[i] & 0xff;
            if (c >= 0x20 && c < 0x7f) {
                i++;
                continue;
            }
            int n = sequenceLength(b, i, end);
            if (n > 0) {
                i += n;
            } else {
                b[i++] = MARK; // its continuation bytes, if any, fail on their own in the next turns
                marked++;
            }
        }
        return marked;
    }

    /** Length of the acceptable character starting at {@code i}, or 0. */
    private static int sequenceLength(byte[] b, int i, int end) {
        int c = b[i] & 0xff;
        int n;
        int cp;
        int min;
        if (c < 0x80) {
            return 0; // ASCII control characters (the printable ones were passed above)
        } else if (c >= 0xc2 && c <= 0xdf) {
            n = 2;
            cp = c & 0x1f;
            min = 0x80;
        } else if (c >= 0xe0 && c <= 0xef) {
            n = 3;
            cp = c & 0x0f;
            min = 0x800;
        } else if (c >= 0xf0 && c <= 0xf4) {
            n = 4;
            cp = c & 0x07;
            min = 0x10000;
        } else {
            return 0;
        }
        if (i + n > end) return 0;
        for (int k = 1; k < n; k++) {
            int cc = b[i + k] & 0xff;
            if ((cc & 0xc0) != 0x80) return 0;
            cp = (cp << 6) | (cc & 0x3f);
        }
        if (cp < min || cp > 0x10ffff || (cp >= 0xd800 && cp <= 0xdfff)) return 0;
        if (cp <= 0x9f) return 0; // U+0080-U+009F: control characters
        if ((cp >= 0xfdd0 && cp <= 0xfddf) || (cp & 0xfffe) == 0xfffe) return 0; // non-characters
        return n;
    }

    @Override
    public long skip(long n) throws IOException {
        // The client never skips; reading keeps the packet tracking right.
        long done = 0;
        byte[] scratch = new byte[(int) Math.min(n, 512)];
        while (done < n) {
            int r = read(scratch, 0, (int) Math.min(scratch.length, n - done));
            if (r < 0) break;
            done += r;
        }
        return done;
    }

    @Override
    public boolean markSupported() {
        return false;
    }
}
