package org.wayhold.http;

import java.io.FilterInputStream;
import java.io.IOException;
import java.io.InputStream;
import java.util.ArrayDeque;

/**
 * Notes the numbers of blank lines in an NDJSON body as the bytes pass to the reader.
 *
 * <p>Why: the ingest reader reports rejected lines with their numbers but hands over valid samples
 * without one, and skips blank lines while still counting them. To give a sample that the session
 * later rejects (too late, too far ahead) its true line number, the caller counts lines and steps over
 * the blank ones noted here. A line is blank when it holds only spaces, tabs and a carriage return (the
 * reader's rule), after a UTF-8 byte order mark on the first line.
 *
 * <p>Memory stays bounded: the reader parses every whole line it has read before it reads again, so at
 * each read the lines completed so far are all processed; blank lines up to there are dropped and
 * {@link #processedLines()} tells the caller how far the reader has certainly got.
 */
final class BlankLines extends FilterInputStream {

    private final ArrayDeque<Long> blanks = new ArrayDeque<>();
    private long line = 1;
    private int lineBytes;
    private boolean lineBlank = true;
    private long processed;

    BlankLines(InputStream in) {
        super(in);
    }

    /** Lines that the reader has certainly parsed: all lines completed before its latest read. */
    long processedLines() {
        return processed;
    }

    /**
     * The number of the next non-blank line after {@code lastLine}.
     *
     * @param lastLine number of the last line accounted for (0 before the first)
     */
    long nextNonBlank(long lastLine) {
        long next = Math.max(lastLine, processed) + 1;
        Long b;
        while ((b = blanks.peekFirst()) != null && b <= next) {
            blanks.pollFirst();
            if (b == next) {
                next++;
            }
        }
        return next;
    }

    @Override
    public int read() throws IOException {
        markProcessed();
        int b = super.read();
        if (b >= 0) {
            scan((byte) b);
        }
        return b;
    }

    @Override
    public int read(byte[] buf, int off, int len) throws IOException {
        markProcessed();
        int n = super.read(buf, off, len);
        for (int i = 0; i < n; i++) {
            scan(buf[off + i]);
        }
        return n;
    }

    private void markProcessed() {
        processed = line - 1;
        Long b;
        while ((b = blanks.peekFirst()) != null && b <= processed) {
            blanks.pollFirst();
        }
    }

    private void scan(byte b) {
        if (b == '\n') {
            if (lineBlank) {
                blanks.addLast(line);
            }
            line++;
            lineBytes = 0;
            lineBlank = true;
            return;
        }
        // RFC 3629 sec. 6: the byte order mark EF BB BF; the reader skips it before the first line.
        boolean bom = line == 1 && lineBytes < 3 && b == BOM[lineBytes] && lineBlank;
        lineBytes++;
        if (!bom && b != ' ' && b != '\t' && b != '\r') {
            lineBlank = false;
        }
    }

    private static final byte[] BOM = {(byte) 0xEF, (byte) 0xBB, (byte) 0xBF};
}
