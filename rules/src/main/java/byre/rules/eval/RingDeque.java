package byre.rules.eval;

/** A growable double-ended queue of (time, value) pairs in primitive arrays: no boxing per reading. */
final class RingDeque {
    private long[] t = new long[16];
    private double[] v = new double[16];
    private int head;
    private int size;

    boolean isEmpty() { return size == 0; }

    int size() { return size; }

    long firstT() { return t[head]; }

    double firstV() { return v[head]; }

    long lastT() { return t[(head + size - 1) & (t.length - 1)]; }

    double lastV() { return v[(head + size - 1) & (t.length - 1)]; }

    void addLast(long time, double value) {
        if (size == t.length) grow();
        int i = (head + size) & (t.length - 1);
        t[i] = time;
        v[i] = value;
        size++;
    }

    void pollFirst() {
        head = (head + 1) & (t.length - 1);
        size--;
    }

    void pollLast() { size--; }

    void clear() {
        head = 0;
        size = 0;
    }

    private void grow() {
        long[] nt = new long[t.length * 2];
        double[] nv = new double[t.length * 2];
        for (int k = 0; k < size; k++) {
            nt[k] = t[(head + k) & (t.length - 1)];
            nv[k] = v[(head + k) & (t.length - 1)];
        }
        t = nt;
        v = nv;
        head = 0;
    }
}
