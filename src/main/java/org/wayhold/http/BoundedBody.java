package org.wayhold.http;

import java.io.FilterInputStream;
import java.io.IOException;
import java.io.InputStream;
import java.util.function.LongSupplier;

/**
 * A request body that fails once more than a given number of bytes has been read, or, when a minimum
 * rate is given, once it arrives slower than that rate.
 *
 * <p>Javalin's {@code maxRequestSize} guards only bodies it reads whole; a body read as a stream has no
 * limit of its own, so a streaming reader counts here. The check covers chunked bodies, which carry no
 * {@code Content-Length} to refuse up front, and inflated gzip bodies, whose size only reading tells.
 *
 * <p>The rate: after a grace period, the bytes read so far must be at least the minimum rate times the
 * time since the grace ended. A client that sends a byte every few seconds ("slow loris") would
 * otherwise hold a server thread for as long as it likes; a blocked read itself is bounded by the
 * connection's idle timeout.
 */
final class BoundedBody extends FilterInputStream {

    /** Thrown when the body passes the size limit. */
    static final class TooLarge extends IOException {
        TooLarge(long maxBytes) {
            super("more than " + maxBytes + " bytes", null);
        }
    }

    /** Thrown when the body arrives slower than the minimum rate. */
    static final class TooSlow extends IOException {
        TooSlow(long bytes, double seconds) {
            super(bytes + " bytes in " + seconds + " s", null);
        }
    }

    private final long maxBytes;
    private final long minBytesPerS;
    private final long graceNanos;
    private final LongSupplier nanoClock;
    private final long startNanos;
    private long count;

    /** @param maxBytes most bytes that may be read (bytes, >= 1) */
    BoundedBody(InputStream in, long maxBytes) {
        this(in, maxBytes, 0, 0.0, System::nanoTime);
    }

    /**
     * @param maxBytes     most bytes that may be read (bytes, >= 1)
     * @param minBytesPerS slowest accepted arrival after the grace period (bytes per second; 0 for none)
     * @param graceS       time before the rate applies (s)
     * @param nanoClock    monotonic time (ns)
     */
    BoundedBody(InputStream in, long maxBytes, long minBytesPerS, double graceS, LongSupplier nanoClock) {
        super(in);
        this.maxBytes = maxBytes;
        this.minBytesPerS = minBytesPerS;
        this.graceNanos = Math.round(graceS * 1e9);
        this.nanoClock = nanoClock;
        this.startNanos = nanoClock.getAsLong();
    }

    @Override
    public int read() throws IOException {
        int b = super.read();
        if (b >= 0) {
            add(1);
        }
        return b;
    }

    @Override
    public int read(byte[] buf, int off, int len) throws IOException {
        int n = super.read(buf, off, len);
        if (n > 0) {
            add(n);
        }
        return n;
    }

    @Override
    public long skip(long n) throws IOException {
        long skipped = super.skip(n);
        add(skipped);
        return skipped;
    }

    @Override
    public boolean markSupported() {
        return false;
    }

    /** Bytes read so far. */
    long count() {
        return count;
    }

    private void add(long n) throws IOException {
        count += n;
        if (count > maxBytes) {
            throw new TooLarge(maxBytes);
        }
        if (minBytesPerS > 0) {
            long late = nanoClock.getAsLong() - startNanos - graceNanos;
            if (late > 0 && count < minBytesPerS * (late / 1e9)) {
                throw new TooSlow(count, (late + graceNanos) / 1e9);
            }
        }
    }
}
