package org.wayhold.http;

import java.io.IOException;
import java.io.InputStream;
import java.security.DigestInputStream;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Comparator;
import java.util.List;
import java.util.Locale;
import java.util.Optional;
import java.util.concurrent.CompletableFuture;
import java.util.function.LongConsumer;
import java.util.function.LongSupplier;
import java.util.zip.GZIPInputStream;
import java.util.zip.ZipException;
import org.wayhold.ingest.LineError;
import org.wayhold.ingest.NdjsonReader;
import org.wayhold.ingest.SampleSink;
import org.wayhold.ingest.UnknownFields;
import org.wayhold.ordering.Admission;
import org.wayhold.sample.Sample;
import org.wayhold.sample.SampleType;
import org.wayhold.session.SessionLog;
import org.wayhold.session.SessionRegistry;
import org.wayhold.settings.IngestSettings;
import org.wayhold.settings.ServerSettings;

/**
 * Reads one request body of samples and submits them to a vehicle's session as it reads.
 *
 * <p>The body is read as a stream and never held whole: lines are parsed one at a time, and valid
 * samples go to the session in chunks of {@link #CHUNK_SAMPLES}, at most {@link #CHUNKS_IN_FLIGHT} of them
 * waiting for the journal at once (a waiting chunk holds its samples), so memory stays bounded whatever the
 * body's size and a dashboard sees a long upload progress. The session is created by the first valid
 * sample, so a body with none leaves no empty session behind. Rejections are kept with their line
 * numbers up to {@code ingest.max_listed_rejections} (the first ones in line order) and only counted
 * beyond that, so a body of nothing but bad lines costs no more memory than a good one.
 *
 * <p>Limits: more than {@code server.max_body_bytes} bytes or {@code server.max_samples_per_request}
 * samples end the request with 413. A body with a {@code Content-Length} over the limit is refused before
 * anything is read; a chunked body is cut where it passes the limit, and the chunks submitted before
 * that point stay applied (the problem says how many samples that was). A vehicle that has sent more
 * than its rate allows gets 429 before its body is read ({@link IngestRate}). At most
 * {@code server.max_concurrent_uploads} bodies are read at once (503 with {@code Retry-After} beyond),
 * and a body that arrives slower than {@code server.min_body_bytes_per_s} is cut with 408: slow
 * uploads cannot hold every server thread.
 *
 * <p>Encoding: {@code Content-Encoding: gzip} bodies are inflated as they are read, and the size limit
 * applies to the inflated bytes too, so a small compressed body cannot expand without bound. Other
 * encodings get 415.
 *
 * <p>Retries: a post with an {@code Idempotency-Key} whose reply is kept ({@link IdempotentReplies})
 * gets that reply again, marked {@code Idempotency-Replayed: true}, and nothing is applied. The reply
 * is recorded in the session log (the journal) before it is sent, so the key survives a restart.
 *
 * <p>Durability: each chunk is recorded in the session log (the journal under {@code serve --data})
 * and applied once its record is durable (write-ahead, see {@code VehicleSession}); the reply waits for
 * every chunk submitted. When the journal cannot write, the chunks it refused are not applied and the
 * reply is 503: the client must send the batch again.
 */
final class SampleIngest {

    /** Samples per submission to the session (count): large enough to amortise its lock and sort. */
    static final int CHUNK_SAMPLES = 4096;

    /**
     * Chunks submitted and not yet durable and applied, at most (count): enough that reading goes on
     * while the journal forces a group, few enough that a long body holds a few chunks, not all of them.
     */
    static final int CHUNKS_IN_FLIGHT = 4;

    /** The body's media type. */
    enum Format { NDJSON, JSON }

    /** The body's content coding (RFC 9110 sec. 8.4.1). */
    enum Encoding { IDENTITY, GZIP }

    /** Where kept replies are made durable. */
    @FunctionalInterface
    interface ReplyLog {
        /**
         * Records a kept reply.
         *
         * @param keep called with the record's sequence number once it is durable (-1 when replies are
         *             not journaled), and only then: it puts the reply in the store
         * @return completes once the record is durable and {@code keep} has run, or exceptionally when it
         *         could not be written (then {@code keep} is not called)
         */
        CompletableFuture<?> record(String vehicleId, byte[] storedReply, LongConsumer keep);

        /** Keeps replies in memory only. */
        ReplyLog NONE = (vehicleId, reply, keep) -> {
            keep.accept(-1);
            return CompletableFuture.completedFuture(null);
        };
    }

    /**
     * One post of samples.
     *
     * @param contentLength  the declared body length (bytes), or -1 when not declared
     * @param idempotencyKey the client's key for retries, or null
     */
    record Post(String vehicleId, Format format, Encoding encoding, long contentLength, InputStream body,
                String idempotencyKey) {
    }

    /**
     * The reply to a post.
     *
     * @param json     the reply document (UTF-8 JSON)
     * @param replayed true when it is the kept reply of an earlier post with the same key
     */
    record Outcome(byte[] json, boolean replayed) {
    }

    private final SessionRegistry sessions;
    private final ServerSettings limits;
    private final IngestSettings ingestLimits;
    private final ServiceMetrics metrics;
    private final NdjsonReader reader;
    private final IngestRate rate;
    private final UploadSlots uploads;
    private final IdempotentReplies replies;
    private final ReplyLog replyLog;
    private final LongSupplier nanoClock;
    private final LongSupplier wallMillis;

    SampleIngest(SessionRegistry sessions, ServiceMetrics metrics, IngestRate rate, UploadSlots uploads,
                 IdempotentReplies replies, ReplyLog replyLog, LongSupplier nanoClock, LongSupplier wallMillis) {
        this.sessions = sessions;
        this.limits = sessions.settings().server();
        this.ingestLimits = sessions.settings().ingest();
        this.metrics = metrics;
        this.reader = new NdjsonReader(limits.maxLineBytes(), ingestLimits);
        this.rate = rate;
        this.uploads = uploads;
        this.replies = replies;
        this.replyLog = replyLog;
        this.nanoClock = nanoClock;
        this.wallMillis = wallMillis;
    }

    /** The format named by a Content-Type header; 415 for anything else. */
    static Format formatOf(String contentType) {
        if (contentType != null) {
            int semicolon = contentType.indexOf(';');
            String type = (semicolon < 0 ? contentType : contentType.substring(0, semicolon)).strip()
                    .toLowerCase(Locale.ROOT);
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
     * The coding named by a Content-Encoding header: none or {@code identity}, or {@code gzip} (also
     * as {@code x-gzip}, RFC 9110 sec. 8.4.1.3); 415 for anything else, including a list of codings.
     */
    static Encoding encodingOf(String contentEncoding) {
        if (contentEncoding == null) {
            return Encoding.IDENTITY;
        }
        switch (contentEncoding.strip().toLowerCase(Locale.ROOT)) {
            case "", "identity" -> {
                return Encoding.IDENTITY;
            }
            case "gzip", "x-gzip" -> {
                return Encoding.GZIP;
            }
            default -> throw HttpProblem.unsupportedEncoding(contentEncoding);
        }
    }

    /**
     * Reads the body and submits its samples; with an idempotency key, first looks for the reply of an
     * earlier post with that key.
     */
    Outcome ingest(Post post) {
        String id = post.vehicleId();
        rate.admit(id);
        if (post.contentLength() > limits.maxBodyBytes()) {
            throw HttpProblem.bodyTooLarge("Content-Length " + post.contentLength() + " is over the limit of "
                    + limits.maxBodyBytes() + " bytes (server.max_body_bytes)");
        }
        if (!uploads.tryAcquire()) {
            throw HttpProblem.busy("body", "body: " + limits.maxConcurrentUploads() + " uploads are being read"
                    + " (server.max_concurrent_uploads); retry in a second");
        }
        try {
            return post.idempotencyKey() == null ? new Outcome(read(post, null), false) : keyed(post);
        } finally {
            uploads.release();
        }
    }

    private Outcome keyed(Post post) {
        String id = post.vehicleId();
        String key = post.idempotencyKey();
        Optional<IdempotentReplies.Stored> kept = replies.find(id, key);
        if (kept.isEmpty()) {
            if (!replies.claim(id, key)) {
                throw HttpProblem.conflict("Idempotency-Key", "Idempotency-Key: a request with this key for '" + id
                        + "' is still being served; retry once it has been answered");
            }
            try {
                // The original may have finished between the look-up and the claim.
                kept = replies.find(id, key);
                if (kept.isEmpty()) {
                    MessageDigest digest = sha256();
                    byte[] reply = read(post, digest);
                    IdempotentReplies.Stored stored = new IdempotentReplies.Stored(id, key, digest.digest(), reply,
                            wallMillis.getAsLong(), -1);
                    try {
                        // Kept as the record becomes durable, not after: a snapshot then either finds the
                        // reply in the store or leaves its record to be read again at the next start.
                        SessionLog.await(replyLog.record(id, stored.encode(),
                                seq -> replies.put(stored.withJournalSeq(seq))));
                    } catch (IOException e) {
                        throw HttpProblem.journalUnavailable();
                    }
                    return new Outcome(reply, false);
                }
            } finally {
                replies.release(id, key);
            }
        }
        byte[] digest = digestOf(post);
        if (!MessageDigest.isEqual(digest, kept.get().bodyDigest())) {
            throw new HttpProblem(422, "idempotency-key-reused", "Idempotency key reused", "Idempotency-Key",
                    "Idempotency-Key: was used for another body of '" + id + "'; a retry must send the same body,"
                            + " and a new batch needs a new key");
        }
        return new Outcome(kept.get().reply(), true);
    }

    /** The SHA-256 of a body as received, read to its end (for comparing a retry with its original). */
    private byte[] digestOf(Post post) {
        MessageDigest digest = sha256();
        try (InputStream in = new DigestInputStream(received(post), digest)) {
            byte[] buf = new byte[16384];
            while (in.read(buf) >= 0) {
                // Only the digest is wanted.
            }
        } catch (BoundedBody.TooLarge e) {
            throw HttpProblem.bodyTooLarge("over the limit of " + limits.maxBodyBytes()
                    + " bytes (server.max_body_bytes)");
        } catch (BoundedBody.TooSlow e) {
            throw HttpProblem.bodyTooSlow(slowDetail(0));
        } catch (IOException e) {
            throw HttpProblem.invalidParameter("body", "could not be read to its end (the connection ended early"
                    + " or the transfer coding was broken)");
        }
        return digest.digest();
    }

    /** The body as received, bounded in size and paced by the minimum rate. */
    private BoundedBody received(Post post) {
        return new BoundedBody(post.body(), limits.maxBodyBytes(), limits.minBodyBytesPerS(),
                ServerSettings.BODY_GRACE_S, nanoClock);
    }

    /**
     * Reads the body and submits its samples.
     *
     * @param digest fed with the body's bytes as received, or null
     * @return the reply document (UTF-8 JSON)
     */
    private byte[] read(Post post, MessageDigest digest) {
        Batch batch = new Batch(post.vehicleId());
        try {
            return read(post, digest, batch);
        } finally {
            // Whatever ended the request, no submitted chunk is left queued on the session unapplied.
            batch.close();
        }
    }

    private byte[] read(Post post, MessageDigest digest, Batch batch) {
        try {
            InputStream in = received(post);
            if (digest != null) {
                in = new DigestInputStream(in, digest);
            }
            if (post.encoding() == Encoding.GZIP) {
                // The limit applies to the inflated bytes too: a small body cannot expand without bound.
                in = new BoundedBody(new GZIPInputStream(in, 16384), limits.maxBodyBytes());
            }
            if (post.format() == Format.NDJSON) {
                reader.read(in, batch);
            } else {
                reader.readJson(in, batch);
            }
            batch.flush();
        } catch (BoundedBody.TooLarge e) {
            batch.finishEarly();
            throw HttpProblem.bodyTooLarge("over the limit of " + limits.maxBodyBytes()
                    + " bytes (server.max_body_bytes); the " + batch.accepted
                    + " samples read before the limit were accepted");
        } catch (BoundedBody.TooSlow e) {
            batch.finishEarly();
            throw HttpProblem.bodyTooSlow(slowDetail(batch.accepted));
        } catch (ZipException e) {
            batch.finishEarly();
            throw HttpProblem.invalidParameter("body", "is not valid gzip data (Content-Encoding: gzip); the "
                    + batch.accepted + " samples read before the damage were accepted");
        } catch (IOException e) {
            // The client went away or sent a broken transfer encoding; what arrived whole is kept.
            batch.finishEarly();
            // The detail names no Java class: problem details are for clients (RFC 9457 sec. 3.1.4).
            throw HttpProblem.invalidParameter("body", "could not be read to its end (the connection ended early"
                    + " or the transfer coding was broken); the " + batch.accepted + " samples read before were accepted");
        }
        batch.awaitRecorded();
        return batch.reply();
    }

    private String slowDetail(long accepted) {
        return "arrived slower than " + limits.minBodyBytesPerS() + " bytes per second after the first "
                + ServerSettings.BODY_GRACE_S + " s (server.min_body_bytes_per_s); the " + accepted
                + " samples read before were accepted";
    }

    private static MessageDigest sha256() {
        try {
            return MessageDigest.getInstance("SHA-256");
        } catch (NoSuchAlgorithmException e) {
            // Every Java platform must provide SHA-256 (java.security.MessageDigest, "Standard Algorithms").
            throw new IllegalStateException("SHA-256 is missing from this Java runtime", e);
        }
    }

    /** A chunk handed to the session, with what its tally needs once it is applied. */
    private record Submitted(SessionRegistry.Submission submission, SampleType[] types, long[] lines) {
    }

    /**
     * Collects lines, submits full chunks and keeps the tallies of one request. Closing it waits for every
     * chunk submitted, so that none is left queued on the session whatever ends the request.
     */
    private final class Batch implements SampleSink, AutoCloseable {
        private final String vehicleId;
        private final int maxListed = ingestLimits.maxListedRejections();
        private final List<Submitted> submitted = new ArrayList<>();
        private final List<Sample> chunk = new ArrayList<>(CHUNK_SAMPLES);
        private final long[] chunkLines = new long[CHUNK_SAMPLES];
        /**
         * Rejections that may still be among the first {@code ingest.max_listed_rejections} in line order.
         * A chunk's own rejections (late, ahead) arrive once it is durable and applied, after later lines
         * were read, so this is trimmed to the lowest lines from time to time rather than kept in order.
         */
        private final List<LineError> pending = new ArrayList<>();
        private long samplesRead;
        long accepted;
        long duplicates;
        long rejectedCount;
        UnknownFields unknown = UnknownFields.NONE;

        Batch(String vehicleId) {
            this.vehicleId = vehicleId;
        }

        @Override
        public void accept(long line, Sample s) {
            samplesRead++;
            if (samplesRead > limits.maxSamplesPerRequest()) {
                finishEarly();
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
            rejectedCount++;
            metrics.rejected(null, e.reason());
            // The reader reports lines in order, and every chunk submitted holds earlier lines: once
            // as many are held as can be listed, this later line can never be among the first listed.
            if (pending.size() < maxListed) {
                pending.add(e);
            }
        }

        void flush() {
            if (!chunk.isEmpty()) {
                SampleType[] types = new SampleType[chunk.size()];
                for (int i = 0; i < types.length; i++) {
                    types[i] = chunk.get(i).type();
                }
                SessionRegistry.Submission s = sessions.submit(vehicleId, chunk);
                submitted.add(new Submitted(s, types, Arrays.copyOf(chunkLines, types.length)));
                // Charged once the session exists: a vehicle refused at server.max_sessions gets no bucket.
                rate.charge(vehicleId, chunk.size());
                if (sessions.find(vehicleId).isEmpty()) {
                    // Deleted meanwhile: its bucket must not outlive it.
                    rate.forget(vehicleId);
                }
                chunk.clear();
                if (submitted.size() > CHUNKS_IN_FLIGHT) {
                    awaitUntilWaiting(CHUNKS_IN_FLIGHT);
                }
            }
            keepFirstRejections();
        }

        /** Submits what was read and waits until it is durable: before a problem reply. */
        void finishEarly() {
            flush();
            awaitRecorded();
        }

        /**
         * Keeps the {@code ingest.max_listed_rejections} rejections with the lowest line numbers seen so far
         * (chunks report theirs once applied, after later lines were read), in bounded memory.
         */
        private void keepFirstRejections() {
            if (pending.size() > 2 * maxListed) {
                pending.sort(Comparator.comparingLong(LineError::line));
                pending.subList(maxListed, pending.size()).clear();
            }
        }

        /**
         * Waits until every chunk submitted so far is durable and applied, and tallies it: no reply,
         * success or problem, reports samples as accepted before they are durable. A chunk the journal
         * could not write (not applied) turns the reply into 503, and so does a vehicle quarantined
         * meanwhile; every chunk is waited for first.
         */
        void awaitRecorded() {
            awaitUntilWaiting(0);
        }

        /**
         * Waits for the oldest chunks, and tallies them, until at most {@code left} are still waiting;
         * after a failure, waits for every chunk (so none is left queued unapplied) and throws the first
         * problem.
         */
        private void awaitUntilWaiting(int left) {
            RuntimeException problem = null;
            while (submitted.size() > (problem == null ? left : 0)) {
                Submitted s = submitted.remove(0);
                try {
                    tally(s, s.submission().admissions());
                } catch (IOException e) {
                    problem = problem != null ? problem : HttpProblem.journalUnavailable();
                } catch (RuntimeException e) {
                    problem = problem != null ? problem : e;
                }
            }
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
            SampleType[] types = SampleType.values();
            long[] byTypeAccepted = new long[types.length];
            long[] byTypeDuplicate = new long[types.length];
            for (int i = 0; i < admissions.size(); i++) {
                Admission a = admissions.get(i);
                SampleType type = chunkOf.types()[i];
                switch (a.kind()) {
                    case APPLIED -> {
                        accepted++;
                        byTypeAccepted[type.ordinal()]++;
                    }
                    case DUPLICATE -> {
                        accepted++;
                        duplicates++;
                        byTypeDuplicate[type.ordinal()]++;
                    }
                    case REJECTED -> {
                        rejectedCount++;
                        pending.add(new LineError(chunkOf.lines()[i], a.reason(), a.detail()));
                        metrics.rejected(type, a.reason());
                    }
                }
            }
            for (SampleType t : types) {
                metrics.accepted(t, byTypeAccepted[t.ordinal()]);
                metrics.duplicates(t, byTypeDuplicate[t.ordinal()]);
            }
        }

        byte[] reply() {
            pending.sort(Comparator.comparingLong(LineError::line));
            List<LineError> listed = pending.subList(0, Math.min(pending.size(), maxListed));
            return PoseJson.document(128 + 112 * listed.size(), g -> {
                g.writeStartObject();
                g.writeNumberField("accepted", accepted);
                g.writeNumberField("duplicates", duplicates);
                g.writeArrayFieldStart("rejected");
                for (LineError e : listed) {
                    g.writeStartObject();
                    g.writeNumberField("line", e.line());
                    g.writeStringField("error", e.detail());
                    g.writeStringField("code", e.reason().code());
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
}
