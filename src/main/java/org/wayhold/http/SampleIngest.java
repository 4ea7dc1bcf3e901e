package org.wayhold.http;

import java.io.IOException;
import java.io.InputStream;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import org.wayhold.ingest.LineError;
import org.wayhold.ingest.NdjsonReader;
import org.wayhold.ingest.SampleSink;
import org.wayhold.ingest.UnknownFields;
import org.wayhold.ordering.Admission;
import org.wayhold.sample.Sample;
import org.wayhold.session.SessionRegistry;
import org.wayhold.settings.ServerSettings;

/**
 * Reads one request body of samples and submits them to a vehicle's session as it reads.
 *
 * <p>The body is read as a stream and never held whole: lines are parsed one at a time, and valid
 * samples go to the session in chunks of {@link #CHUNK_SAMPLES}, so memory stays bounded whatever the
 * body's size and a dashboard sees a long upload progress. The session is created by the first valid
 * sample, so a body with none leaves no empty session behind.
 *
 * <p>Limits: more than {@code server.max_body_bytes} bytes or {@code server.max_samples_per_request}
 * samples end the request with 413. A body with a {@code Content-Length} over the limit is refused before
 * anything is read; a chunked body is cut where it passes the limit, and the chunks submitted before
 * that point stay applied (the problem says how many samples that was). Resending the whole body is
 * safe: exact duplicates are recognised and ignored by the session. A vehicle that has sent more than
 * its rate allows gets 429 before its body is read ({@link IngestRate}).
 *
 * <p>Durability: each chunk is recorded in the session log (the journal under {@code serve --data})
 * and applied once its record is durable (write-ahead, see {@code VehicleSession}); the reply waits for
 * every chunk submitted. When the journal cannot write, the chunks it refused are not applied and the
 * reply is 503: the client must send the batch again.
 */
final class SampleIngest {

    /** Samples per submission to the session (count): large enough to amortise its lock and sort. */
    static final int CHUNK_SAMPLES = 4096;

    /** Most rejections listed in a reply (count); {@code rejected_count} always gives the total. */
    static final int MAX_LISTED_REJECTIONS = 1000;

    /** The body's media type. */
    enum Format { NDJSON, JSON }

    private final SessionRegistry sessions;
    private final ServerSettings limits;
    private final ServiceMetrics metrics;
    private final NdjsonReader reader;
    private final IngestRate rate;

    SampleIngest(SessionRegistry sessions, ServerSettings limits, ServiceMetrics metrics, IngestRate rate) {
        this.sessions = sessions;
        this.limits = limits;
        this.metrics = metrics;
        this.reader = new NdjsonReader(limits.maxLineBytes());
        this.rate = rate;
    }

    /** The format named by a Content-Type header; 415 for anything else. */
    static Format formatOf(String contentType) {
        if (contentType != null) {
            int semicolon = contentType.indexOf(';');
            String type = (semicolon < 0 ? contentType : contentType.substring(0, semicolon)).strip()
                    .toLowerCase(java.util.Locale.ROOT);
            switch (type) {
                case "application/x-ndjson", "application/ndjson", "application/jsonl" -> {
                    return Format.NDJSON;
                }
                case "application/json" -> {
                    return Format.JSON;
                }
                default -> {
                }
            }
        }
        throw HttpProblem.unsupportedMediaType(contentType);
    }

    /**
     * Reads the body and submits its samples.
     *
     * @param contentLength the declared body length (bytes), or -1 when not declared
     * @return the reply document (UTF-8 JSON)
     */
    byte[] ingest(String vehicleId, Format format, long contentLength, InputStream body) {
        rate.admit(vehicleId);
        if (contentLength > limits.maxBodyBytes()) {
            throw HttpProblem.bodyTooLarge("Content-Length " + contentLength + " is over the limit of "
                    + limits.maxBodyBytes() + " bytes (server.max_body_bytes)");
        }
        BlankLines blanks = format == Format.NDJSON ? new BlankLines(body) : null;
        Batch batch = new Batch(vehicleId, blanks);
        try {
            return read(format, body, blanks, batch);
        } finally {
            // Whatever ended the request, no submitted chunk is left queued on the session unapplied.
            batch.close();
        }
    }

    private byte[] read(Format format, InputStream body, BlankLines blanks, Batch batch) {
        try {
            if (format == Format.NDJSON) {
                reader.read(new BoundedBody(blanks, limits.maxBodyBytes()), batch);
            } else {
                reader.readJson(new BoundedBody(body, limits.maxBodyBytes()), batch);
            }
            batch.flush();
        } catch (BoundedBody.TooLarge e) {
            batch.flush();
            batch.awaitRecorded();
            throw HttpProblem.bodyTooLarge("over the limit of " + limits.maxBodyBytes()
                    + " bytes (server.max_body_bytes); the " + batch.accepted
                    + " samples read before the limit were accepted");
        } catch (IOException e) {
            // The client went away or sent a broken transfer encoding; what arrived whole is kept.
            batch.flush();
            batch.awaitRecorded();
            // The detail names no Java class: problem details are for clients (RFC 9457 sec. 3.1.4).
            throw HttpProblem.invalidParameter("body", "could not be read to its end (the connection ended early"
                    + " or the transfer coding was broken); the " + batch.accepted + " samples read before were accepted");
        }
        batch.awaitRecorded();
        return batch.reply();
    }

    /** A chunk handed to the session, with what its tally needs once it is applied. */
    private record Submitted(SessionRegistry.Submission submission, int[] types, long[] lines) {
    }

    /**
     * Collects lines, submits full chunks and keeps the tallies of one request. Closing it waits for every
     * chunk submitted, so that none is left queued on the session whatever ends the request.
     */
    private final class Batch implements SampleSink, AutoCloseable {
        private final String vehicleId;
        private final BlankLines blanks;
        private final List<Submitted> submitted = new ArrayList<>();
        private final List<Sample> chunk = new ArrayList<>(CHUNK_SAMPLES);
        private long[] chunkLines = new long[CHUNK_SAMPLES];
        private final List<LineError> pending = new ArrayList<>();
        private final List<LineError> listed = new ArrayList<>();
        private long line;
        private long samplesRead;
        long accepted;
        long duplicates;
        long rejectedCount;
        UnknownFields unknown = UnknownFields.NONE;

        Batch(String vehicleId, BlankLines blanks) {
            this.vehicleId = vehicleId;
            this.blanks = blanks;
        }

        @Override
        public void accept(Sample s) {
            // The reader reports lines in order but gives numbers only to rejected ones: count on from
            // the last number, stepping over blank lines (NDJSON) that the reader skips silently.
            line = blanks == null ? line + 1 : blanks.nextNonBlank(line);
            samplesRead++;
            if (samplesRead > limits.maxSamplesPerRequest()) {
                flush();
                awaitRecorded();
                throw HttpProblem.bodyTooLarge("more than " + limits.maxSamplesPerRequest()
                        + " samples in one request (server.max_samples_per_request); the " + accepted
                        + " samples read before the limit were accepted");
            }
            chunkLines[chunk.size()] = line;
            chunk.add(s);
            if (chunk.size() == CHUNK_SAMPLES) {
                flush();
            }
        }

        @Override
        public void unknownFields(UnknownFields u) {
            unknown = u;
        }

        @Override
        public void reject(LineError e) {
            line = e.line();
            pending.add(e);
            rejectedCount++;
            metrics.rejected(ServiceMetrics.UNKNOWN_TYPE, ServiceMetrics.reasonClass(e.reason()));
        }

        void flush() {
            if (!chunk.isEmpty()) {
                rate.charge(vehicleId, chunk.size());
                int[] types = new int[chunk.size()];
                for (int i = 0; i < types.length; i++) {
                    types[i] = typeIndex(chunk.get(i));
                }
                SessionRegistry.Submission s = sessions.submit(vehicleId, chunk);
                submitted.add(new Submitted(s, types, java.util.Arrays.copyOf(chunkLines, types.length)));
                chunk.clear();
            }
            keepFirstRejections();
        }

        /**
         * Keeps the {@link #MAX_LISTED_REJECTIONS} rejections with the lowest line numbers seen so far
         * (chunks report theirs once applied, after later lines were read), in bounded memory.
         */
        private void keepFirstRejections() {
            if (pending.size() > 2 * MAX_LISTED_REJECTIONS) {
                pending.sort(Comparator.comparingLong(LineError::line));
                pending.subList(MAX_LISTED_REJECTIONS, pending.size()).clear();
            }
        }

        /**
         * Waits until every chunk submitted so far is durable and applied, and tallies it: no reply,
         * success or problem, reports samples as accepted before they are durable. A chunk the journal
         * could not write (not applied) turns the reply into 503, and so does a vehicle quarantined
         * meanwhile; every chunk is waited for first.
         */
        void awaitRecorded() {
            RuntimeException problem = null;
            for (Submitted s : submitted) {
                try {
                    tally(s, s.submission().admissions());
                } catch (IOException e) {
                    problem = problem != null ? problem : HttpProblem.journalUnavailable();
                } catch (RuntimeException e) {
                    problem = problem != null ? problem : e;
                }
            }
            submitted.clear();
            keepFirstRejections();
            if (problem != null) {
                throw problem;
            }
        }

        @Override
        public void close() {
            if (!submitted.isEmpty()) {
                try {
                    awaitRecorded();
                } catch (RuntimeException e) {
                    // The request already ends with another problem.
                }
            }
        }

        private void tally(Submitted chunkOf, List<Admission> admissions) {
            long[] byTypeAccepted = new long[TYPES.length];
            long[] byTypeDuplicate = new long[TYPES.length];
            for (int i = 0; i < admissions.size(); i++) {
                Admission a = admissions.get(i);
                int type = chunkOf.types()[i];
                switch (a.kind()) {
                    case APPLIED -> {
                        accepted++;
                        byTypeAccepted[type]++;
                    }
                    case DUPLICATE -> {
                        accepted++;
                        duplicates++;
                        byTypeDuplicate[type]++;
                    }
                    case REJECTED -> {
                        rejectedCount++;
                        pending.add(new LineError(chunkOf.lines()[i], a.reason()));
                        metrics.rejected(TYPES[type], ServiceMetrics.reasonClass(a.reason()));
                    }
                }
            }
            for (int k = 0; k < TYPES.length; k++) {
                metrics.accepted(TYPES[k], byTypeAccepted[k]);
                metrics.duplicates(TYPES[k], byTypeDuplicate[k]);
            }
        }

        byte[] reply() {
            pending.sort(Comparator.comparingLong(LineError::line));
            listed.addAll(pending.subList(0, Math.min(pending.size(), MAX_LISTED_REJECTIONS)));
            pending.clear();
            return PoseJson.document(128 + 96 * listed.size(), g -> {
                g.writeStartObject();
                g.writeNumberField("accepted", accepted);
                g.writeNumberField("duplicates", duplicates);
                g.writeArrayFieldStart("rejected");
                for (LineError e : listed) {
                    g.writeStartObject();
                    g.writeNumberField("line", e.line());
                    g.writeStringField("error", e.reason());
                    g.writeEndObject();
                }
                g.writeEndArray();
                g.writeNumberField("rejected_count", rejectedCount);
                if (!unknown.none()) {
                    g.writeObjectFieldStart("unknown_fields");
                    g.writeNumberField("lines", unknown.lines());
                    g.writeArrayFieldStart("names");
                    for (String name : unknown.firstNames()) {
                        g.writeString(name);
                    }
                    g.writeEndArray();
                    g.writeEndObject();
                }
                g.writeEndObject();
            });
        }
    }

    private static final String[] TYPES = {"gnss", "wheel_speed", "yaw_rate", "reference"};

    private static int typeIndex(Sample s) {
        return switch (s.typeName()) {
            case "gnss" -> 0;
            case "wheel_speed" -> 1;
            case "yaw_rate" -> 2;
            default -> 3;
        };
    }
}
