package byre.mqtt;

import java.io.IOException;
import java.io.InputStream;
import java.io.OutputStream;
import java.net.InetAddress;
import java.net.Socket;
import java.net.SocketAddress;
import java.net.SocketException;
import java.util.List;
import java.util.function.BiFunction;
import javax.net.ssl.HandshakeCompletedListener;
import javax.net.ssl.SSLParameters;
import javax.net.ssl.SSLSession;
import javax.net.ssl.SSLSocket;
import javax.net.ssl.SSLSocketFactory;

/**
 * TLS sockets whose decrypted input passes a {@link PublishTopicGuard}, as the plain sockets of
 * {@link BufferedSocketFactory} do. The MQTT client insists on an {@link SSLSocket} for {@code ssl://}, so each
 * socket is a thin wrapper that hands every call to the real TLS socket and only wraps its input stream.
 */
final class GuardedSslSocketFactory extends SSLSocketFactory {
    private final SSLSocketFactory tls;

    GuardedSslSocketFactory(SSLSocketFactory tls) {
        this.tls = tls;
    }

    @Override
    public Socket createSocket() throws IOException {
        return new GuardedSocket((SSLSocket) tls.createSocket());
    }

    @Override
    public Socket createSocket(Socket s, String host, int port, boolean autoClose) throws IOException {
        return new GuardedSocket((SSLSocket) tls.createSocket(s, host, port, autoClose));
    }

    @Override
    public Socket createSocket(String host, int port) throws IOException {
        return new GuardedSocket((SSLSocket) tls.createSocket(host, port));
    }

    @Override
    public Socket createSocket(String host, int port, InetAddress localHost, int localPort) throws IOException {
        return new GuardedSocket((SSLSocket) tls.createSocket(host, port, localHost, localPort));
    }

    @Override
    public Socket createSocket(InetAddress host, int port) throws IOException {
        return new GuardedSocket((SSLSocket) tls.createSocket(host, port));
    }

    @Override
    public Socket createSocket(InetAddress address, int port, InetAddress localAddress, int localPort) throws IOException {
        return new GuardedSocket((SSLSocket) tls.createSocket(address, port, localAddress, localPort));
    }

    @Override
    public String[] getDefaultCipherSuites() {
        return tls.getDefaultCipherSuites();
    }

    @Override
    public String[] getSupportedCipherSuites() {
        return tls.getSupportedCipherSuites();
    }

    /** Every call goes to {@code s}; only the input stream is wrapped. */
    private static final class GuardedSocket extends SSLSocket {
        private final SSLSocket s;
        private InputStream in;

        GuardedSocket(SSLSocket s) {
            this.s = s;
        }

        @Override
        public synchronized InputStream getInputStream() throws IOException {
            if (in == null) in = new PublishTopicGuard(s.getInputStream());
            return in;
        }

        @Override public OutputStream getOutputStream() throws IOException { return s.getOutputStream(); }
        @Override public void connect(SocketAddress endpoint) throws IOException { s.connect(endpoint); }
        @Override public void connect(SocketAddress endpoint, int timeout) throws IOException { s.connect(endpoint, timeout); }
        @Override public void bind(SocketAddress bindpoint) throws IOException { s.bind(bindpoint); }
        @Override public void close() throws IOException { s.close(); }
        @Override public void shutdownInput() throws IOException { s.shutdownInput(); }
        @Override public void shutdownOutput() throws IOException { s.shutdownOutput(); }
        @Override public boolean isConnected() { return s.isConnected(); }
        @Override public boolean isBound() { return s.isBound(); }
        @Override public boolean isClosed() { return s.isClosed(); }
        @Override public boolean isInputShutdown() { return s.isInputShutdown(); }
        @Override public boolean isOutputShutdown() { return s.isOutputShutdown(); }
        @Override public InetAddress getInetAddress() { return s.getInetAddress(); }
        @Override public InetAddress getLocalAddress() { return s.getLocalAddress(); }
        @Override public int getPort() { return s.getPort(); }
        @Override public int getLocalPort() { return s.getLocalPort(); }
        @Override public SocketAddress getRemoteSocketAddress() { return s.getRemoteSocketAddress(); }
        @Override public SocketAddress getLocalSocketAddress() { return s.getLocalSocketAddress(); }
        @Override public void setSoTimeout(int timeout) throws SocketException { s.setSoTimeout(timeout); }
        @Override public int getSoTimeout() throws SocketException { return s.getSoTimeout(); }
        @Override public void setTcpNoDelay(boolean on) throws SocketException { s.setTcpNoDelay(on); }
        @Override public boolean getTcpNoDelay() throws SocketException { return s.getTcpNoDelay(); }
        @Override public void setKeepAlive(boolean on) throws SocketException { s.setKeepAlive(on); }
        @Override public boolean getKeepAlive() throws SocketException { return s.getKeepAlive(); }
        @Override public void setSoLinger(boolean on, int linger) throws SocketException { s.setSoLinger(on, linger); }
        @Override public int getSoLinger() throws SocketException { return s.getSoLinger(); }
        @Override public void setReceiveBufferSize(int size) throws SocketException { s.setReceiveBufferSize(size); }
        @Override public int getReceiveBufferSize() throws SocketException { return s.getReceiveBufferSize(); }
        @Override public void setSendBufferSize(int size) throws SocketException { s.setSendBufferSize(size); }
        @Override public int getSendBufferSize() throws SocketException { return s.getSendBufferSize(); }
        @Override public String toString() { return s.toString(); }

        @Override public String[] getSupportedCipherSuites() { return s.getSupportedCipherSuites(); }
        @Override public String[] getEnabledCipherSuites() { return s.getEnabledCipherSuites(); }
        @Override public void setEnabledCipherSuites(String[] suites) { s.setEnabledCipherSuites(suites); }
        @Override public String[] getSupportedProtocols() { return s.getSupportedProtocols(); }
        @Override public String[] getEnabledProtocols() { return s.getEnabledProtocols(); }
        @Override public void setEnabledProtocols(String[] protocols) { s.setEnabledProtocols(protocols); }
        @Override public SSLSession getSession() { return s.getSession(); }
        @Override public SSLSession getHandshakeSession() { return s.getHandshakeSession(); }
        @Override public void addHandshakeCompletedListener(HandshakeCompletedListener l) { s.addHandshakeCompletedListener(l); }
        @Override public void removeHandshakeCompletedListener(HandshakeCompletedListener l) { s.removeHandshakeCompletedListener(l); }
        @Override public void startHandshake() throws IOException { s.startHandshake(); }
        @Override public void setUseClientMode(boolean mode) { s.setUseClientMode(mode); }
        @Override public boolean getUseClientMode() { return s.getUseClientMode(); }
        @Override public void setNeedClientAuth(boolean need) { s.setNeedClientAuth(need); }
        @Override public boolean getNeedClientAuth() { return s.getNeedClientAuth(); }
        @Override public void setWantClientAuth(boolean want) { s.setWantClientAuth(want); }
        @Override public boolean getWantClientAuth() { return s.getWantClientAuth(); }
        @Override public void setEnableSessionCreation(boolean flag) { s.setEnableSessionCreation(flag); }
        @Override public boolean getEnableSessionCreation() { return s.getEnableSessionCreation(); }
        @Override public SSLParameters getSSLParameters() { return s.getSSLParameters(); }
        @Override public void setSSLParameters(SSLParameters params) { s.setSSLParameters(params); }
        @Override public String getApplicationProtocol() { return s.getApplicationProtocol(); }
        @Override public String getHandshakeApplicationProtocol() { return s.getHandshakeApplicationProtocol(); }

        @Override
        public void setHandshakeApplicationProtocolSelector(BiFunction<SSLSocket, List<String>, String> selector) {
            s.setHandshakeApplicationProtocolSelector(selector);
        }

        @Override
        public BiFunction<SSLSocket, List<String>, String> getHandshakeApplicationProtocolSelector() {
            return s.getHandshakeApplicationProtocolSelector();
        }
    }
}
