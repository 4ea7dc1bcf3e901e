package org.wayhold.http;

import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.DataInputStream;
import java.io.DataOutputStream;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.HashSet;
import java.util.Iterator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.Set;
import java.util.function.LongSupplier;
import org.wayhold.journal.Journal;

/**
 * The replies of sample posts that carried an {@code Idempotency-Key}, kept so that a retry of the same
 * post gets the same reply instead of being applied again.
 *
 * <p>Keys are scoped to a vehicle. A reply is kept for {@code ingest.idempotency_ttl_s} of wall time, at
 * most {@code ingest.idempotency_keys_per_vehicle} per vehicle (the oldest go first) and at most
 * {@code ingest.idempotency_max_bytes} of replies in all (the oldest of any vehicle go first), so memory
 * stays bounded whatever keys clients invent. With each reply the SHA-256 digest of the request body is
 * kept: a key sent again with another body is an error of the client, not a retry. A key whose request
 * is still being served is claimed, so that a retry racing its original is told so rather than applied
 * twice. A vehicle's replies go with its session ({@link #forgetVehicle}).
 *
 * <p>Thread-safe: every method holds this object's lock for a few map operations.
 */
final class IdempotentReplies {

    /**
     * One kept reply.
     *
     * @param vehicleId    the vehicle the key belongs to
     * @param key          the client's {@code Idempotency-Key}
     * @param bodyDigest   SHA-256 of the request body as received (32 bytes)
     * @param reply        the reply document (UTF-8 JSON) as first sent
     * @param createdMillis wall time the reply was first sent (ms since the epoch)
     * @param journalSeq   sequence number of the journal record that holds it, -1 when not journaled
     *                     (not part of {@link #encode}: the record carries its own number)
     */
    record Stored(String vehicleId, String key, byte[] bodyDigest, byte[] reply, long createdMillis,
                  long journalSeq) {

        /** The same reply, held by journal record {@code seq}. */
        Stored withJournalSeq(long seq) {
            return new Stored(vehicleId, key, bodyDigest, reply, createdMillis, seq);
        }

        /** Bytes this entry is charged against the byte bound: the arrays and the strings, roughly. */
        long bytes() {
            return 64L + reply.length + bodyDigest.length + 2L * (vehicleId.length() + key.length());
        }

        /** The binary form kept in the journal. */
        byte[] encode() {
            try {
                ByteArrayOutputStream bytes = new ByteArrayOutputStream(64 + reply.length);
                DataOutputStream out = new DataOutputStream(bytes);
                out.writeByte(FORMAT);
                out.writeUTF(vehicleId);
                out.writeUTF(key);
                out.writeLong(createdMillis);
                out.writeShort(bodyDigest.length);
                out.write(bodyDigest);
                out.writeInt(reply.length);
                out.write(reply);
                out.flush();
                return bytes.toByteArray();
            } catch (IOException e) {
                throw new UncheckedIOException(e);
            }
        }

        /** Reads what {@link #encode} wrote; the journal sequence is -1 until set. */
        static Stored decode(byte[] data) throws IOException {
            DataInputStream in = new DataInputStream(new ByteArrayInputStream(data));
            int format = in.readByte();
            if (format != FORMAT) {
                throw new IOException("idempotent reply: format " + format + ", expected " + FORMAT);
            }
            String vehicleId = in.readUTF();
            String key = in.readUTF();
            long created = in.readLong();
            byte[] digest = new byte[in.readUnsignedShort()];
            in.readFully(digest);
            int n = in.readInt();
            if (n < 0 || n > data.length) {
                throw new IOException("idempotent reply: length " + n + " of " + data.length + " bytes");
            }
            byte[] reply = new byte[n];
            in.readFully(reply);
            return new Stored(vehicleId, key, digest, reply, created, -1);
        }
    }

    private static final byte FORMAT = 1;

    private record Id(String vehicleId, String key) {
    }

    private final int perVehicle;
    private final long ttlMillis;
    private final long maxBytes;
    private final LongSupplier wallMillis;
    /** Every kept reply, oldest first. */
    private final LinkedHashMap<Id, Stored> all = new LinkedHashMap<>();
    /** Each vehicle's kept replies, oldest first; may start with entries already dropped from {@link #all}. */
    private final Map<String, ArrayDeque<Stored>> byVehicle = new HashMap<>();
    private final Set<Id> inFlight = new HashSet<>();
    private long bytes;

    /**
     * @param perVehicle most replies kept per vehicle (count, 0 keeps none)
     * @param ttlS       how long a reply is kept (s of wall time)
     * @param maxBytes   most bytes of replies kept in all
     * @param wallMillis the wall clock (ms since the epoch): kept replies survive a restart, so their age
     *                   is measured on a clock that does too
     */
    IdempotentReplies(int perVehicle, double ttlS, long maxBytes, LongSupplier wallMillis) {
        this.perVehicle = perVehicle;
        this.ttlMillis = Math.round(ttlS * 1000.0);
        this.maxBytes = maxBytes;
        this.wallMillis = wallMillis;
    }

    /** The kept reply of a key, if it has one that has not expired. */
    synchronized Optional<Stored> find(String vehicleId, String key) {
        expire();
        return Optional.ofNullable(all.get(new Id(vehicleId, key)));
    }

    /**
     * Marks a key as being served.
     *
     * @return false when a request with this key is being served already
     */
    synchronized boolean claim(String vehicleId, String key) {
        return inFlight.add(new Id(vehicleId, key));
    }

    /** Ends a claim, whatever became of the request. */
    synchronized void release(String vehicleId, String key) {
        inFlight.remove(new Id(vehicleId, key));
    }

    /** Keeps a reply (replacing one of the same key), then drops what the bounds no longer allow. */
    synchronized void put(Stored s) {
        if (perVehicle == 0 || wallMillis.getAsLong() - s.createdMillis() >= ttlMillis) {
            return;
        }
        Id id = new Id(s.vehicleId(), s.key());
        Stored old = all.remove(id);
        if (old != null) {
            bytes -= old.bytes();
        }
        all.put(id, s);
        bytes += s.bytes();
        ArrayDeque<Stored> mine = byVehicle.computeIfAbsent(s.vehicleId(), v -> new ArrayDeque<>());
        mine.addLast(s);
        dropStale(s.vehicleId());
        int live = 0;
        for (Stored m : mine) {
            if (all.get(new Id(m.vehicleId(), m.key())) == m) {
                live++;
            }
        }
        while (live > perVehicle) {
            Stored oldest = mine.pollFirst();
            if (remove(oldest)) {
                live--;
            }
        }
        while (bytes > maxBytes && !all.isEmpty()) {
            Iterator<Stored> it = all.values().iterator();
            Stored oldest = it.next();
            it.remove();
            bytes -= oldest.bytes();
            dropStale(oldest.vehicleId());
        }
        expire();
    }

    /** Drops every reply of a vehicle (its session was dropped: its samples are gone, so are its replies). */
    synchronized void forgetVehicle(String vehicleId) {
        ArrayDeque<Stored> mine = byVehicle.remove(vehicleId);
        if (mine != null) {
            for (Stored s : mine) {
                remove(s);
            }
        }
    }

    /**
     * The kept replies that are in the journal, oldest first, as the journal writes them into a snapshot
     * (so that they outlive the segments a restart no longer reads).
     */
    synchronized List<Journal.KeptReply> journaled() {
        expire();
        List<Journal.KeptReply> out = new ArrayList<>(all.size());
        for (Stored s : all.values()) {
            if (s.journalSeq() >= 0) {
                out.add(new Journal.KeptReply(s.vehicleId(), s.journalSeq(), s.encode()));
            }
        }
        return out;
    }

    /** Replies kept (count). */
    synchronized int size() {
        return all.size();
    }

    /** Bytes charged for the replies kept. */
    synchronized long bytes() {
        return bytes;
    }

    /** Removes an entry if it is still the current one of its key. */
    private boolean remove(Stored s) {
        Id id = new Id(s.vehicleId(), s.key());
        if (all.get(id) != s) {
            return false;
        }
        all.remove(id);
        bytes -= s.bytes();
        return true;
    }

    /** Drops entries at the head of a vehicle's queue that are no longer kept. */
    private void dropStale(String vehicleId) {
        ArrayDeque<Stored> mine = byVehicle.get(vehicleId);
        if (mine == null) {
            return;
        }
        while (!mine.isEmpty() && all.get(new Id(vehicleId, mine.peekFirst().key())) != mine.peekFirst()) {
            mine.pollFirst();
        }
        if (mine.isEmpty()) {
            byVehicle.remove(vehicleId);
        }
    }

    /** Drops replies older than the time to live; they are the oldest, so at the head. */
    private void expire() {
        long now = wallMillis.getAsLong();
        Iterator<Stored> it = all.values().iterator();
        while (it.hasNext()) {
            Stored s = it.next();
            if (now - s.createdMillis() < ttlMillis) {
                break;
            }
            it.remove();
            bytes -= s.bytes();
            dropStale(s.vehicleId());
        }
    }
}
