package byre.mqtt;

import java.io.BufferedInputStream;
import java.io.IOException;
import java.io.InputStream;
import java.net.InetAddress;
import java.net.InetSocketAddress;
import java.net.Socket;
import javax.net.SocketFactory;

/**
 * Plain TCP sockets whose input stream is buffered and guarded. The MQTT client reads each packet's fixed header
 * a byte at a time straight from the socket, which costs a system call per byte; behind a buffer a burst of small
 * readings costs one read per few kilobytes instead of several per message. The {@link PublishTopicGuard} on top
 * keeps a topic the client cannot decode from stopping it. (TLS sockets buffer by records already; they get the
 * guard from {@link GuardedSslSocketFactory}.)
 */
final class BufferedSocketFactory extends SocketFactory {
    static final int BUFFER_BYTES = 16 * 1024;

    @Override
    public Socket createSocket() {
        return new BufferedSocket();
    }

    @Override
    public Socket createSocket(String host, int port) throws IOException {
        return connected(new InetSocketAddress(host, port), null);
    }

    @Override
    public Socket createSocket(String host, int port, InetAddress localHost, int localPort) throws IOException {
        return connected(new InetSocketAddress(host, port), new InetSocketAddress(localHost, localPort));
    }

    @Override
    public Socket createSocket(InetAddress host, int port) throws IOException {
        return connected(new InetSocketAddress(host, port), null);
    }

    @Override
    public Socket createSocket(InetAddress address, int port, InetAddress localAddress, int localPort) throws IOException {
        return connected(new InetSocketAddress(address, port), new InetSocketAddress(localAddress, localPort));
    }

    private static Socket connected(InetSocketAddress remote, InetSocketAddress local) throws IOException {
        Socket s = new BufferedSocket();
        if (local != null) s.bind(local);
        s.connect(remote);
        return s;
    }

    private static final class BufferedSocket extends Socket {
        private InputStream in;

        @Override
        public synchronized InputStream getInputStream() throws IOException {
            if (in == null) in = new PublishTopicGuard(new BufferedInputStream(super.getInputStream(), BUFFER_BYTES));
            return in;
        }
    }
}
