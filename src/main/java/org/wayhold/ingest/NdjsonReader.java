package org.wayhold.ingest;

import com.fasterxml.jackson.core.JsonFactory;
import com.fasterxml.jackson.core.JsonFactoryBuilder;
import com.fasterxml.jackson.core.JsonParser;
import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.core.JsonToken;
import com.fasterxml.jackson.core.StreamReadFeature;
import com.fasterxml.jackson.core.json.JsonReadFeature;
import java.io.BufferedInputStream;
import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.lang.invoke.MethodHandles;
import java.lang.invoke.VarHandle;
import java.nio.ByteOrder;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Optional;
import java.util.zip.GZIPInputStream;
import org.wayhold.sample.RejectionReason;
import org.wayhold.sample.Sample;
import org.wayhold.settings.IngestSettings;
import org.wayhold.settings.ServerSettings;

/**
 * Reads samples from NDJSON (one JSON object per line, UTF-8) or from a JSON body.
 *
 * <p>The input is split into lines here and each line gets its own streaming parser, so a malformed
 * line costs only itself: it is rejected with its 1-based line number and reading goes on with the next
 * line. Memory use is bounded whatever the input size: a 64 KiB read buffer plus at most one line of
 * {@code maxLineBytes}.
 *
 * <p>What is accepted and what is rejected:
 * <ul>
 *   <li>blank lines (only spaces, tabs, a carriage return) are skipped, not rejected; they still count
 *       for line numbers; a UTF-8 byte order mark before the first line is skipped;</li>
 *   <li>a line that is not well-formed JSON, not a single JSON object, or longer than
 *       {@code maxLineBytes} (not counting its CR LF or LF) is rejected;</li>
 *   <li>{@code NaN} and {@code Infinity} are read as numbers so that the rejection names the field they
 *       sit in, rather than reporting a generic syntax error; they are rejected in every known field;</li>
 *   <li>a known field with the wrong JSON type, a missing required field, an unknown {@code type} or
 *       {@code fix}, a field given twice, and any value the sample records refuse are rejected with a
 *       reason that starts with the field name;</li>
 *   <li>a valid sample with a magnitude beyond the physical bounds of {@link IngestSettings} (a wheel
 *       speed of 1e300 m/s, a sigma of 1e200 m) is rejected as implausible, the field named, so that it
 *       never reaches a filter;</li>
 *   <li>unknown fields are ignored whatever their value (forward compatibility: a newer sender may add
 *       fields), and so are known fields that the line's {@code type} does not use; the unknown ones are
 *       counted and reported to the sink once at the end ({@link SampleSink#unknownFields}), so that a
 *       misspelt field does not pass unnoticed.</li>
 * </ul>
 *
 * <p>Speed: the common line (a flat object of known fields with plain values) is decoded straight from
 * its bytes; only lines that are anything else get a JSON parser of their own. Both roads give the same
 * sample or the same rejection for every line the first one takes (see {@code SampleDecoder#decodeFlat}).
 *
 * <p>An instance holds no state between calls and may be shared between threads.
 */
public final class NdjsonReader {

    /** Bytes read from the input at a time. */
    private static final int CHUNK_BYTES = 64 * 1024;

    private static final byte[] UTF8_BOM = {(byte) 0xEF, (byte) 0xBB, (byte) 0xBF};

    /** Reads eight bytes of an array as one long, first byte lowest, for the newline search. */
    private static final VarHandle LITTLE_ENDIAN_LONGS =
            MethodHandles.byteArrayViewVarHandle(long[].class, ByteOrder.LITTLE_ENDIAN);

    /**
     * Non-numeric numbers are allowed so they reach the decoder and are rejected by field name. The fast
     * double parser (Lemire's algorithm as ported in jackson-core) gives the same correctly rounded double
     * as {@link Double#parseDouble(String)}, in a fraction of the time.
     */
    private static final JsonFactory FACTORY = new JsonFactoryBuilder()
            .enable(JsonReadFeature.ALLOW_NON_NUMERIC_NUMBERS)
            .enable(StreamReadFeature.USE_FAST_DOUBLE_PARSER)
            .build();

    private final int maxLineBytes;
    private final Plausibility plausibility;
    /** Whether common lines go through {@link SampleDecoder#decodeFlat} before any JSON parser. */
    private final boolean flatLines;

    /** A reader with the service's default line limit and bounds ({@link ServerSettings#defaults()}, {@link IngestSettings#defaults()}). */
    public NdjsonReader() {
        this(ServerSettings.defaults().maxLineBytes());
    }

    /** @param maxLineBytes longest accepted line, without its line terminator (bytes, >= 1) */
    public NdjsonReader(int maxLineBytes) {
        this(maxLineBytes, IngestSettings.defaults());
    }

    /**
     * @param maxLineBytes longest accepted line, without its line terminator (bytes, >= 1)
     * @param limits       the physical bounds a sample must keep to
     */
    public NdjsonReader(int maxLineBytes, IngestSettings limits) {
        this(maxLineBytes, limits, true);
    }

    /**
     * @param maxLineBytes longest accepted line, without its line terminator (bytes, >= 1)
     * @param limits       the physical bounds a sample must keep to
     * @param flatLines    false sends every line through the JSON parser: tests compare both roads
     */
    NdjsonReader(int maxLineBytes, IngestSettings limits, boolean flatLines) {
        if (maxLineBytes < 1) {
            throw new IllegalArgumentException("maxLineBytes: must be at least 1 byte, was " + maxLineBytes);
        }
        this.maxLineBytes = maxLineBytes;
        this.plausibility = new Plausibility(limits);
        this.flatLines = flatLines;
    }

    /** Longest accepted line, without its line terminator (bytes). */
    public int maxLineBytes() {
        return maxLineBytes;
    }

    /**
     * Reads UTF-8 NDJSON to its end, handing every non-blank line to {@code sink} in input order. Does
     * not close {@code in}.
     *
     * @throws IOException only when reading {@code in} fails; bad lines are reported to the sink
     */
    public void read(InputStream in, SampleSink sink) throws IOException {
        LineSplitter lines = new LineSplitter(sink);
        byte[] chunk = new byte[CHUNK_BYTES];
        int n;
        while ((n = in.read(chunk, 0, chunk.length)) >= 0) {
            lines.feed(chunk, n);
        }
        lines.finish();
        reportUnknown(lines.decoder, sink);
    }

    private static void reportUnknown(SampleDecoder decoder, SampleSink sink) {
        UnknownFields u = decoder.unknownFields();
        if (!u.none()) {
            sink.unknownFields(u);
        }
    }

    /**
     * Reads an NDJSON file with a default reader; a file whose name ends in {@code .gz} or that starts
     * with the gzip magic bytes is decompressed on the fly.
     */
    public static void readFile(Path p, SampleSink sink) throws IOException {
        new NdjsonReader().readPath(p, sink);
    }

    /** Reads an NDJSON file with this reader, decompressing it as {@link #readFile} does. */
    public void readPath(Path p, SampleSink sink) throws IOException {
        try (InputStream in = openMaybeGzip(p)) {
            read(in, sink);
        }
    }

    /** Reads a whole NDJSON file into memory with a default reader, decompressing as {@link #readFile} does. */
    public static ReadResult readFileAll(Path p) throws IOException {
        Collector c = new Collector();
        readFile(p, c);
        return new ReadResult(c.samples, c.rejected, c.unknown);
    }

    /** Reads a whole {@code application/json} body into memory ({@link #readJson}). */
    public ReadResult readAllJson(InputStream in) throws IOException {
        Collector c = new Collector();
        readJson(in, c);
        return new ReadResult(c.samples, c.rejected, c.unknown);
    }

    /** Reads all of {@code in} into memory; I/O failures are rethrown unchecked. */
    public ReadResult readAll(InputStream in) {
        Collector c = new Collector();
        try {
            read(in, c);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return new ReadResult(c.samples, c.rejected, c.unknown);
    }

    /**
     * Reads an {@code application/json} body: one sample object, or an array of sample objects. The
     * "line" of a rejection is the 1-based index of the element in the array (1 for a single object).
     * A bad element is rejected and the rest are read; a syntax error ends the body, keeping what came
     * before it and rejecting the element where it occurred. Does not close {@code in}.
     *
     * @throws IOException only when reading {@code in} fails
     */
    public void readJson(InputStream in, SampleSink sink) throws IOException {
        SampleDecoder decoder = new SampleDecoder();
        long index = 1;
        try (JsonParser p = FACTORY.createParser(in)) {
            p.disable(JsonParser.Feature.AUTO_CLOSE_SOURCE);
            JsonToken first = p.nextToken();
            if (first == null) {
                sink.reject(new LineError(1, RejectionReason.MALFORMED, "malformed JSON: the body is empty"));
                return;
            }
            if (first == JsonToken.START_ARRAY) {
                index = 0;
                JsonToken element;
                while ((element = p.nextToken()) != JsonToken.END_ARRAY) {
                    index++;
                    readElement(p, element, decoder, index, sink);
                }
                index++;
            } else {
                readElement(p, first, decoder, index, sink);
                index++;
            }
            if (p.nextToken() != null) {
                sink.reject(new LineError(index, RejectionReason.MALFORMED,
                        "malformed JSON: more content after the end of the body"));
            }
        } catch (JsonProcessingException e) {
            // Inside an array the index is 0 until the first element starts: a syntax error there (such
            // as "[}") belongs to element 1, and line numbers are 1-based.
            sink.reject(new LineError(Math.max(1, index), RejectionReason.MALFORMED, malformed(e)));
        }
        reportUnknown(decoder, sink);
    }

    private void readElement(JsonParser p, JsonToken first, SampleDecoder decoder, long index, SampleSink sink)
            throws IOException {
        if (first != JsonToken.START_OBJECT) {
            p.skipChildren();
            sink.reject(new LineError(index, RejectionReason.MALFORMED, SampleDecoder.notAnObject(first)));
            return;
        }
        Sample s;
        try {
            s = decoder.decode(p);
        } catch (IllegalArgumentException e) {
            sink.reject(new LineError(index, RejectionReason.INVALID, e.getMessage()));
            return;
        }
        deliver(index, s, sink);
    }

    /**
     * Hands a decoded sample to the sink, or rejects it when a value lies beyond the physical bounds:
     * the one place where both roads of a line, and JSON bodies, meet.
     */
    private void deliver(long line, Sample s, SampleSink sink) {
        Optional<String> implausible = plausibility.violation(s);
        if (implausible.isPresent()) {
            sink.reject(new LineError(line, RejectionReason.IMPLAUSIBLE, implausible.get()));
        } else {
            sink.accept(line, s);
        }
    }

    private static InputStream openMaybeGzip(Path p) throws IOException {
        BufferedInputStream in = new BufferedInputStream(Files.newInputStream(p), CHUNK_BYTES);
        try {
            in.mark(2);
            // RFC 1952 section 2.3.1: a gzip member starts with ID1 = 0x1f, ID2 = 0x8b.
            boolean magic = in.read() == 0x1f && in.read() == 0x8b;
            in.reset();
            if (magic || p.getFileName().toString().endsWith(".gz")) {
                return new GZIPInputStream(in, CHUNK_BYTES);
            }
            return in;
        } catch (IOException e) {
            in.close();
            throw e;
        }
    }

    private static String malformed(JsonProcessingException e) {
        String message = e.getOriginalMessage();
        // Jackson adds a source excerpt on a new line for some errors; the first line says enough.
        int newline = message.indexOf('\n');
        if (newline >= 0) {
            message = message.substring(0, newline);
        }
        return e.getLocation() == null || e.getLocation().getColumnNr() < 1
                ? "malformed JSON: " + message
                : "malformed JSON at column " + e.getLocation().getColumnNr() + ": " + message;
    }

    /** Decodes a common line from its bytes; returns false when the JSON parser must read it. */
    private boolean decodeFlat(byte[] buf, int from, int to, long line, SampleDecoder decoder, SampleSink sink) {
        Sample s;
        try {
            s = decoder.decodeFlat(buf, from, to);
        } catch (IllegalArgumentException e) {
            sink.reject(new LineError(line, RejectionReason.INVALID, e.getMessage()));
            return true;
        }
        if (s == null) {
            return false;
        }
        deliver(line, s, sink);
        return true;
    }

    /** Parses one line that has passed the length and blank checks. */
    private void parseLine(byte[] buf, int from, int to, long line, SampleDecoder decoder, SampleSink sink) {
        Sample s;
        try (JsonParser p = FACTORY.createParser(buf, from, to - from)) {
            JsonToken first = p.nextToken();
            if (first != JsonToken.START_OBJECT) {
                sink.reject(new LineError(line, RejectionReason.MALFORMED, SampleDecoder.notAnObject(first)));
                return;
            }
            String semanticError = null;
            Sample decoded = null;
            try {
                decoded = decoder.decode(p);
            } catch (IllegalArgumentException e) {
                semanticError = e.getMessage();
            }
            // Only one object per line: anything after it makes the whole line malformed.
            if (p.nextToken() != null) {
                sink.reject(new LineError(line, RejectionReason.MALFORMED,
                        "malformed JSON: more content after the object"));
                return;
            }
            if (semanticError != null) {
                sink.reject(new LineError(line, RejectionReason.INVALID, semanticError));
                return;
            }
            s = decoded;
        } catch (JsonProcessingException e) {
            sink.reject(new LineError(line, RejectionReason.MALFORMED, malformed(e)));
            return;
        } catch (IOException e) {
            // A parser over a byte array does no I/O; anything else it throws is a malformed line.
            sink.reject(new LineError(line, RejectionReason.MALFORMED, "malformed JSON: " + e.getMessage()));
            return;
        }
        deliver(line, s, sink);
    }

    private static boolean isBlank(byte[] buf, int from, int to) {
        for (int i = from; i < to; i++) {
            byte b = buf[i];
            if (b != ' ' && b != '\t' && b != '\r') {
                return false;
            }
        }
        return true;
    }

    /**
     * Cuts a byte stream into lines. A line lying wholly inside one chunk is parsed where it lies; only a
     * line that straddles chunks is copied, into a buffer that grows to at most {@code maxLineBytes + 1}
     * (room for a CR before the LF). Beyond that the line is dropped byte by byte until its LF.
     */
    private final class LineSplitter {
        private final SampleSink sink;
        final SampleDecoder decoder = new SampleDecoder();
        private byte[] pending = new byte[Math.min(maxLineBytes + 1, 1024)];
        private int pendingLength;
        private boolean overlong;
        private long line = 1;

        LineSplitter(SampleSink sink) {
            this.sink = sink;
        }

        void feed(byte[] chunk, int length) {
            int pos = 0;
            while (pos < length) {
                int newline = indexOfNewline(chunk, pos, length);
                int end = newline < 0 ? length : newline;
                if (newline >= 0 && pendingLength == 0 && !overlong) {
                    finishLine(chunk, pos, end);
                } else {
                    append(chunk, pos, end);
                    if (newline >= 0) {
                        finishLine(pending, 0, pendingLength);
                    }
                }
                pos = end + 1;
            }
        }

        /** The last line, when the input does not end with a line feed. */
        void finish() {
            if (pendingLength > 0 || overlong) {
                finishLine(pending, 0, pendingLength);
            }
        }

        private void append(byte[] chunk, int from, int to) {
            if (overlong) {
                return;
            }
            int needed = pendingLength + (to - from);
            if (needed > maxLineBytes + 1) {
                overlong = true;
                pendingLength = 0;
                return;
            }
            if (needed > pending.length) {
                pending = Arrays.copyOf(pending, Math.min(maxLineBytes + 1,
                        Math.max(needed, 2 * pending.length)));
            }
            System.arraycopy(chunk, from, pending, pendingLength, to - from);
            pendingLength = needed;
        }

        private void finishLine(byte[] buf, int from, int to) {
            long number = line++;
            boolean tooLong = overlong;
            overlong = false;
            pendingLength = 0;
            if (to > from && buf[to - 1] == '\r') {
                to--;
            }
            if (number == 1 && startsWithBom(buf, from, to)) {
                from += UTF8_BOM.length;
            }
            if (tooLong || to - from > maxLineBytes) {
                sink.reject(new LineError(number, RejectionReason.MALFORMED, "line longer than " + maxLineBytes
                        + " bytes"));
                return;
            }
            if (isBlank(buf, from, to)) {
                return;
            }
            if (flatLines && decodeFlat(buf, from, to, number, decoder, sink)) {
                return;
            }
            parseLine(buf, from, to, number, decoder, sink);
        }
    }

    private static boolean startsWithBom(byte[] buf, int from, int to) {
        return to - from >= UTF8_BOM.length && buf[from] == UTF8_BOM[0] && buf[from + 1] == UTF8_BOM[1]
                && buf[from + 2] == UTF8_BOM[2];
    }

    /**
     * Index of the first LF in buf[from, to), or -1. Eight bytes at a time: with x = word XOR 0x0A..0A,
     * (x - 0x01..01) AND NOT x AND 0x80..80 flags the zero bytes of x, i.e. the LFs; the lowest flag is
     * always a true one (a borrow only runs upwards from a zero byte), so its position is the first LF
     * (the zero-byte test of Hacker's Delight, 2nd ed., sec. 6-1).
     */
    private static int indexOfNewline(byte[] buf, int from, int to) {
        int i = from;
        for (; i + Long.BYTES <= to; i += Long.BYTES) {
            long x = (long) LITTLE_ENDIAN_LONGS.get(buf, i) ^ 0x0A0A0A0A0A0A0A0AL;
            long flags = (x - 0x0101010101010101L) & ~x & 0x8080808080808080L;
            if (flags != 0) {
                return i + (Long.numberOfTrailingZeros(flags) >>> 3);
            }
        }
        for (; i < to; i++) {
            if (buf[i] == '\n') {
                return i;
            }
        }
        return -1;
    }

    private static final class Collector implements SampleSink {
        private final List<Sample> samples = new ArrayList<>();
        private final List<LineError> rejected = new ArrayList<>();
        private UnknownFields unknown = UnknownFields.NONE;

        @Override
        public void accept(long line, Sample s) {
            samples.add(s);
        }

        @Override
        public void reject(LineError e) {
            rejected.add(e);
        }

        @Override
        public void unknownFields(UnknownFields u) {
            unknown = u;
        }
    }
}
