package org.wayhold.http;

import java.io.FilterInputStream;
import java.io.IOException;
import java.io.InputStream;

/**
 * A request body that fails once more than a given number of bytes has been read.
 *
 * <p>Javalin's {@code maxRequestSize} guards only bodies it reads whole; a body read as a stream has no
 * limit of its own, so a streaming reader counts here. The check covers chunked bodies, which carry no
 * {@code Content-Length} to refuse up front.
 */
final class BoundedBody extends FilterInputStream {

    /** Thrown when the body passes the limit. */
    static final class TooLarge extends IOException {
        TooLarge(long maxBytes) {
            super("more than " + maxBytes + " bytes", null);
        }
    }

    private final long maxBytes;
    private long count;

    /** @param maxBytes most bytes that may be read (bytes, >= 1) */
    BoundedBody(InputStream in, long maxBytes) {
        super(in);
        this.maxBytes = maxBytes;
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

    private void add(long n) throws TooLarge {
        count += n;
        if (count > maxBytes) {
            throw new TooLarge(maxBytes);
        }
    }
}
