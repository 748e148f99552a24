package byre.config;

import java.net.InetAddress;
import java.net.UnknownHostException;

/** Checks on listening addresses as written in the configuration; pure, no name is looked up. */
public final class Addresses {
    private Addresses() {}

    /** Whether {@code host} is {@code localhost} or a loopback address literal (IPv6 in brackets or not). */
    public static boolean isLoopback(String host) {
        if (host == null) return false;
        String h = host.strip();
        if (h.startsWith("[") && h.endsWith("]")) h = h.substring(1, h.length() - 1);
        if (h.equalsIgnoreCase("localhost")) return true;
        if (!h.matches("\\d{1,3}(\\.\\d{1,3}){3}") && !(h.contains(":") && h.matches("[0-9A-Fa-f:.]+"))) return false;
        try {
            return InetAddress.getByName(h).isLoopbackAddress(); // a literal: no name service is asked
        } catch (UnknownHostException e) {
            return false;
        }
    }
}
