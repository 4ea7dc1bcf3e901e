package org.wayhold.stream;

import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.DataInputStream;
import java.io.DataOutputStream;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.regex.Pattern;
import org.wayhold.http.PoseJson;
import org.wayhold.ingest.LineError;
import org.wayhold.ingest.NdjsonReader;
import org.wayhold.ingest.NdjsonWriter;
import org.wayhold.ingest.SampleSink;
import org.wayhold.ordering.Admission;
import org.wayhold.pipeline.FixRecord;
import org.wayhold.pipeline.TrackOutput;
import org.wayhold.pipeline.VehiclePipeline;
import org.wayhold.pose.Pose;
import org.wayhold.sample.RejectionReason;
import org.wayhold.sample.Sample;
import org.wayhold.settings.Settings;

/**
 * One record of samples applied to one vehicle: the vehicle's stored state in, the new state and the
 * records to write out. No Kafka here, so the whole step is tested without a broker; the processor
 * only moves bytes between it and the store and topics.
 *
 * <p>The state is {@link #STATE_FORMAT}, then the pipeline's own state ({@link VehiclePipeline#writeState},
 * the layout the journal's snapshots hold), then what the worker adds: the time and the JSON of the last
 * pose given out, and the outage in progress. No pose history: a few kilobytes per vehicle, most of it
 * the reorder window's samples and checkpoints.
 *
 * <p>Poses given out are those the service's pose stream would give for the same records: the history
 * points (every fix, and at least every {@code history.interval_s}) new since the last record, never
 * going back in time; a late sample re-filters, and only the corrected poses from the last one given out
 * on are given again (see {@code VehicleSession}).
 */
final class VehicleStep {

    /** Version of the state layout; a state of another version is refused, never misread. */
    static final int STATE_FORMAT = 1;

    /**
     * The service's vehicle ids ({@code VehicleRoutes}): letters, digits, {@code . _ : -}, starting with
     * a letter or digit, at most {@code server.max_vehicle_id_chars} characters.
     */
    private static final Pattern VEHICLE_ID = Pattern.compile("[A-Za-z0-9][A-Za-z0-9._:-]*");

    /** Most bytes of a refused record's text repeated in its dead letter (bytes). */
    static final int MAX_QUOTED_BYTES = 64 * 1024;

    /** A pose given out: its time (s, vehicle clock) and its JSON. */
    record PoseRecord(double t, byte[] json) {
    }

    /**
     * What a record did.
     *
     * @param state       the vehicle's new state, null when it is unchanged (nothing was applied)
     * @param poses       poses to give out, oldest first
     * @param events      outage events (JSON), oldest first
     * @param deadLetters refused samples (JSON), in the record's order
     * @param applied     samples applied (count)
     */
    record Outcome(byte[] state, List<PoseRecord> poses, List<byte[]> events, List<byte[]> deadLetters,
                   int applied) {
    }

    /** Where a record came from, repeated in its dead letters so the refused input can be found. */
    record Source(String topic, int partition, long offset) {
    }

    private final Settings settings;
    private final NdjsonReader reader;

    VehicleStep(Settings settings) {
        this.settings = settings;
        this.reader = new NdjsonReader(settings.server().maxLineBytes(), settings.ingest());
    }

    /** Whether a record key is a vehicle id the service would accept. */
    boolean validVehicleId(String key) {
        return key != null && key.length() <= settings.server().maxVehicleIdChars()
                && VEHICLE_ID.matcher(key).matches();
    }

    /**
     * Applies one record to one vehicle.
     *
     * @param vehicleId the record's key
     * @param state     the vehicle's stored state, null for a vehicle never seen
     * @param value     NDJSON sample lines (one or many), or a JSON array of sample objects
     * @throws UncheckedIOException when the stored state is not one this version can read
     */
    Outcome apply(String vehicleId, byte[] state, byte[] value, Source source) {
        if (!validVehicleId(vehicleId)) {
            String detail = "key: a vehicle id must be 1 to " + settings.server().maxVehicleIdChars()
                    + " letters, digits or . _ : -, starting with a letter or digit, was "
                    + (vehicleId == null ? "missing" : "'" + clip(vehicleId) + "'");
            return new Outcome(null, List.of(), List.of(),
                    List.of(deadLetter(vehicleId, 0, RejectionReason.INVALID, detail, quote(value), source)), 0);
        }
        byte[] body = value == null ? new byte[0] : value;
        List<Sample> samples = new ArrayList<>();
        List<Long> lines = new ArrayList<>();
        List<byte[]> deadLetters = new ArrayList<>();
        boolean array = startsWithArray(body);
        String[] lineTexts = array ? null : new String(body, StandardCharsets.UTF_8).split("\r?\n", -1);
        SampleSink sink = new SampleSink() {
            @Override
            public void accept(long line, Sample s) {
                samples.add(s);
                lines.add(line);
            }

            @Override
            public void reject(LineError e) {
                deadLetters.add(deadLetter(vehicleId, e.line(), e.reason(), e.detail(),
                        lineTexts == null || e.line() < 1 || e.line() > lineTexts.length ? null
                                : clip(lineTexts[(int) e.line() - 1], MAX_QUOTED_BYTES),
                        source));
            }
        };
        try {
            if (array) {
                reader.readJson(new ByteArrayInputStream(body), sink);
            } else {
                reader.read(new ByteArrayInputStream(body), sink);
            }
        } catch (IOException e) {
            // A byte array does not fail to read.
            throw new UncheckedIOException(e);
        }
        if (samples.isEmpty()) {
            return new Outcome(null, List.of(), List.of(), deadLetters, 0);
        }

        Vehicle v = new Vehicle(vehicleId);
        if (state != null) {
            v.read(state);
        }
        List<Admission> admissions = v.pipeline.submit(samples);
        int applied = 0;
        for (int i = 0; i < admissions.size(); i++) {
            Admission a = admissions.get(i);
            if (a.kind() == Admission.Kind.REJECTED) {
                deadLetters.add(deadLetter(vehicleId, lines.get(i), a.reason(), a.detail(), ndjson(samples.get(i)),
                        source));
            } else if (a.kind() == Admission.Kind.APPLIED) {
                applied++;
            }
        }
        List<PoseRecord> poses = new ArrayList<>();
        List<byte[]> events = new ArrayList<>();
        for (Pose p : v.produced) {
            if (p.t() < v.emittedUpToT) {
                continue;
            }
            byte[] json = PoseJson.toBytes(p);
            if (p.t() == v.emittedUpToT && Arrays.equals(json, v.lastEmittedJson)) {
                continue;
            }
            poses.add(new PoseRecord(p.t(), json));
            events.addAll(v.outages.next(vehicleId, p));
            v.emittedUpToT = p.t();
            v.lastEmittedJson = json;
        }
        return new Outcome(v.write(), poses, events, deadLetters, applied);
    }

    /** A pipeline built for this vehicle with a stored state read into it (tools and tests). */
    VehiclePipeline restore(String vehicleId, byte[] state) {
        Vehicle v = new Vehicle(vehicleId);
        v.read(state);
        return v.pipeline;
    }

    /** One vehicle during one record. */
    private final class Vehicle {
        final VehiclePipeline pipeline;
        /** History points produced by this record, one per instant, rewinds applied. */
        final List<Pose> produced = new ArrayList<>();
        final OutageEvents outages = new OutageEvents();
        double emittedUpToT = Double.NEGATIVE_INFINITY;
        byte[] lastEmittedJson = new byte[0];

        Vehicle(String vehicleId) {
            pipeline = new VehiclePipeline(settings, settings.profileFor(vehicleId), null, new TrackOutput() {
                @Override
                public void pose(Pose pose) {
                    // One pose per instant, as the service's history keeps them: a later pose of the same
                    // time replaces the earlier one.
                    int n = produced.size();
                    if (n > 0 && produced.get(n - 1).t() == pose.t()) {
                        produced.set(n - 1, pose);
                    } else {
                        produced.add(pose);
                    }
                }

                @Override
                public void fix(FixRecord record) {
                }

                @Override
                public void rewoundTo(double tS) {
                    produced.removeIf(p -> p.t() > tS);
                }
            });
        }

        void read(byte[] state) {
            try (DataInputStream in = new DataInputStream(new ByteArrayInputStream(state))) {
                int format = in.readInt();
                if (format != STATE_FORMAT) {
                    throw new IOException("worker state: format " + format + ", expected " + STATE_FORMAT);
                }
                pipeline.readState(in);
                emittedUpToT = in.readDouble();
                int n = in.readInt();
                if (n < 0 || n > MAX_QUOTED_BYTES) {
                    throw new IOException("worker state: last pose of " + n + " bytes");
                }
                lastEmittedJson = new byte[n];
                in.readFully(lastEmittedJson);
                outages.read(in);
                if (in.read() >= 0) {
                    throw new IOException("worker state: bytes left over after the state");
                }
            } catch (IOException e) {
                throw new UncheckedIOException(e);
            }
        }

        byte[] write() {
            ByteArrayOutputStream bytes = new ByteArrayOutputStream(4096);
            try (DataOutputStream out = new DataOutputStream(bytes)) {
                out.writeInt(STATE_FORMAT);
                pipeline.writeState(out);
                out.writeDouble(emittedUpToT);
                out.writeInt(lastEmittedJson.length);
                out.write(lastEmittedJson);
                outages.write(out);
            } catch (IOException e) {
                throw new UncheckedIOException(e);
            }
            return bytes.toByteArray();
        }
    }

    private static boolean startsWithArray(byte[] body) {
        for (byte b : body) {
            if (b == '[') {
                return true;
            }
            if (b != ' ' && b != '\t' && b != '\r' && b != '\n') {
                return false;
            }
        }
        return false;
    }

    /** A sample as the NDJSON line that would send it again. */
    private static String ndjson(Sample s) {
        ByteArrayOutputStream bytes = new ByteArrayOutputStream(128);
        try (NdjsonWriter w = new NdjsonWriter(bytes)) {
            w.write(s);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return bytes.toString(StandardCharsets.UTF_8).strip();
    }

    /**
     * A dead letter: {@code vehicle} (the key, null when missing), {@code line} (1-based line of the
     * record, or element of its JSON array; 0 for the whole record), {@code code} (the stable rejection
     * code), {@code error} (the reason in words), {@code sample} (the line as sent, or the sample as an
     * NDJSON line; null when not available) and {@code source} {@code topic, partition, offset}.
     */
    private static byte[] deadLetter(String vehicleId, long line, RejectionReason reason, String detail, String sample,
                                     Source source) {
        return PoseJson.document(256, g -> {
            g.writeStartObject();
            g.writeStringField("vehicle", vehicleId);
            g.writeNumberField("line", line);
            g.writeStringField("code", reason.code());
            g.writeStringField("error", detail);
            g.writeStringField("sample", sample);
            g.writeObjectFieldStart("source");
            g.writeStringField("topic", source.topic());
            g.writeNumberField("partition", source.partition());
            g.writeNumberField("offset", source.offset());
            g.writeEndObject();
            g.writeEndObject();
        });
    }

    private static String quote(byte[] value) {
        if (value == null) {
            return null;
        }
        return clip(new String(value, 0, Math.min(value.length, MAX_QUOTED_BYTES), StandardCharsets.UTF_8),
                MAX_QUOTED_BYTES);
    }

    private static String clip(String text) {
        return clip(text, 64);
    }

    private static String clip(String text, int max) {
        return text.length() <= max ? text : text.substring(0, max) + "...";
    }
}
