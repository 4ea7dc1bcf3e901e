package org.wayhold.ingest;

import com.fasterxml.jackson.core.JsonFactory;
import com.fasterxml.jackson.core.JsonFactoryBuilder;
import com.fasterxml.jackson.core.JsonGenerator;
import java.io.Closeable;
import java.io.Flushable;
import java.io.IOException;
import java.io.OutputStream;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.zip.GZIPOutputStream;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.ReferencePoint;
import org.wayhold.sample.Sample;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;

/**
 * Writes samples as NDJSON in the contract's format, one object per line, {@code type} and {@code t}
 * first. Optional fields that a record marks as not given (NaN, or -1 satellites) are left out; the fix
 * type is always written. Doubles are written with {@link Double#toString(double)}, whose digits read
 * back to the same double (Java SE 17 API, {@code Double.toString}: "as many digits as are needed to
 * uniquely distinguish the argument value from adjacent values"), so a file read back with
 * {@link NdjsonReader} gives bit-identical samples.
 */
public final class NdjsonWriter implements Closeable, Flushable {

    /** No separator between root values: each object ends with its own LF instead. */
    private static final JsonFactory FACTORY = new JsonFactoryBuilder().rootValueSeparator((String) null).build();

    private static final int GZIP_BUFFER_BYTES = 64 * 1024;

    private final JsonGenerator out;

    /** Writes UTF-8 to {@code out}; {@link #close()} closes it. */
    public NdjsonWriter(OutputStream out) {
        try {
            this.out = FACTORY.createGenerator(out);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /** Creates or truncates a file; gzip-compressed when the name ends in {@code .gz}. */
    public static NdjsonWriter open(Path p) throws IOException {
        OutputStream file = Files.newOutputStream(p);
        if (p.getFileName().toString().endsWith(".gz")) {
            try {
                return new NdjsonWriter(new GZIPOutputStream(file, GZIP_BUFFER_BYTES));
            } catch (IOException e) {
                file.close();
                throw e;
            }
        }
        return new NdjsonWriter(file);
    }

    /** Writes one sample as one line. */
    public void write(Sample s) throws IOException {
        out.writeStartObject();
        out.writeStringField("type", s.type().wireName());
        out.writeNumberField("t", s.t());
        if (s instanceof GnssFix g) {
            out.writeNumberField("lat", g.latDeg());
            out.writeNumberField("lon", g.lonDeg());
            optional("alt", g.altM());
            optional("sigma_h", g.sigmaHM());
            optional("sigma_v", g.sigmaVM());
            out.writeStringField("fix", g.fix().wireName());
            if (g.hasSats()) {
                out.writeNumberField("sats", g.sats());
            }
            optional("hdop", g.hdop());
            optional("speed", g.speedMps());
            optional("course", g.courseDeg());
        } else if (s instanceof WheelSpeed w) {
            out.writeNumberField("speed", w.speedMps());
        } else if (s instanceof YawRate y) {
            out.writeNumberField("rate", y.yawRateRadPerS());
        } else if (s instanceof ReferencePoint r) {
            out.writeNumberField("lat", r.latDeg());
            out.writeNumberField("lon", r.lonDeg());
            optional("alt", r.altM());
            optional("heading", r.headingDeg());
        }
        out.writeEndObject();
        out.writeRaw('\n');
    }

    private void optional(String field, double value) throws IOException {
        if (!Double.isNaN(value)) {
            out.writeNumberField(field, value);
        }
    }

    @Override
    public void flush() throws IOException {
        out.flush();
    }

    /** Flushes and closes the underlying stream (finishing the gzip trailer when there is one). */
    @Override
    public void close() throws IOException {
        out.close();
    }
}
