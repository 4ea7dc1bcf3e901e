package org.wayhold.journal;

import java.io.ByteArrayOutputStream;
import java.io.DataInputStream;
import java.io.DataOutputStream;
import java.io.EOFException;
import java.io.IOException;
import java.io.OutputStream;
import java.nio.ByteBuffer;
import java.nio.channels.FileChannel;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.util.ArrayList;
import java.util.List;
import java.util.zip.CRC32C;

/**
 * The layout of a snapshot file: a sequence of frames {@code [length u32][CRC32C u32][payload]}, each
 * checked on its own. The first frame is the header ({@code HEADER, magic, floor}), then one frame per
 * session ({@code STATE, vehicle id, last sequence, state bytes} or {@code QUARANTINED, vehicle id,
 * last sequence, reason}), then one per reply kept for retries ({@code REPLY, vehicle id, sequence of
 * its record, reply bytes}), then the end ({@code END, entry count, reply count}). A file without its
 * end frame was not written to its end and is unreadable.
 *
 * <p>Written as a stream, one session at a time: only one session's state is ever held in memory, and
 * each frame's checksum is computed as it is written. Read in two passes over the file: one that checks
 * every frame and notes where each entry lies, and one that reads the entries to restore, so that
 * nothing is restored from a file that turns out to be damaged further on.
 */
final class SnapshotFile {

    static final int MAGIC = 0x57485332; // "WHS2"
    static final byte HEADER = 0x10;
    static final byte STATE = 1;
    static final byte QUARANTINED = 2;
    static final byte REPLY = 3;
    static final byte END = 0x7f;
    private static final int FRAME_HEADER_BYTES = 8;
    /** Largest frame accepted when reading (bytes): anything longer is a corrupt length field. */
    private static final int MAX_FRAME_BYTES = 1 << 30;

    private SnapshotFile() {
    }

    /** What a snapshot holds for one vehicle, and where its state lies in the file. */
    record Entry(String vehicleId, byte kind, long lastSeq, String reason, long stateOffset, int stateLength) {
    }

    /** A checked snapshot file: its floor and entries, in file order. */
    /**
     * @param floorSeq        the journal's next sequence number when the snapshot began
     * @param firstPendingSeq every record numbered below it was written (or refused) before any session
     *                        was captured, so each session's state holds its own records below it; the
     *                        records from it to the floor may have been waiting to be written, and are
     *                        applied after the state when they are this session's
     */
    record Index(Path path, long floorSeq, long firstPendingSeq, List<Entry> entries,
                 List<Journal.KeptReply> replies) {
        Entry find(String vehicleId) {
            for (Entry e : entries) {
                if (e.vehicleId().equals(vehicleId)) {
                    return e;
                }
            }
            return null;
        }
    }

    /** Writes frames to a stream, one entry at a time, reusing one buffer for the entries. */
    static final class Writer {
        private final OutputStream out;
        private final Buffer entry = new Buffer();
        private final DataOutputStream entryData = new DataOutputStream(entry);
        private int count;
        private int replies;

        Writer(OutputStream out, long floorSeq, long firstPendingSeq) throws IOException {
            this.out = out;
            entryData.writeByte(HEADER);
            entryData.writeInt(MAGIC);
            entryData.writeLong(floorSeq);
            entryData.writeLong(firstPendingSeq);
            flushFrame();
        }

        /** Writes one session; {@code source} writes its state and says what it wrote. */
        void entry(String vehicleId, Journal.SnapshotSource source) throws IOException {
            entry.reset();
            entryData.writeByte(STATE);
            entryData.writeUTF(vehicleId);
            entryData.writeLong(0L); // the last sequence, known once the session is written
            int stateStart = entry.size();
            Journal.SnapshotEntry written = source.write(vehicleId, entryData);
            if (written == null) {
                return;
            }
            entryData.flush();
            if (written.quarantineReason() != null) {
                entry.truncate(stateStart);
                entry.array()[0] = QUARANTINED;
                entryData.writeUTF(clip(written.quarantineReason()));
                entryData.flush();
            }
            ByteBuffer.wrap(entry.array()).putLong(stateStart - 8, written.lastSeq());
            flushFrame();
            count++;
        }

        /** Writes one kept reply; call after the sessions. */
        void reply(Journal.KeptReply r) throws IOException {
            entry.reset();
            entryData.writeByte(REPLY);
            entryData.writeUTF(r.vehicleId());
            entryData.writeLong(r.seq());
            entryData.writeInt(r.reply().length);
            entryData.write(r.reply());
            flushFrame();
            replies++;
        }

        /** Writes the end frame; the file is complete once it is on the device. */
        void finish() throws IOException {
            entry.reset();
            entryData.writeByte(END);
            entryData.writeInt(count);
            entryData.writeInt(replies);
            flushFrame();
            out.flush();
        }

        private void flushFrame() throws IOException {
            entryData.flush();
            int length = entry.size();
            CRC32C c = new CRC32C();
            c.update(entry.array(), 0, length);
            byte[] header = new byte[FRAME_HEADER_BYTES];
            ByteBuffer.wrap(header).putInt(length).putInt((int) c.getValue());
            out.write(header);
            out.write(entry.array(), 0, length);
            entry.reset();
        }

        /** A reason is a short message; a long one is cut so that it fits writeUTF's 64 KiB. */
        private static String clip(String reason) {
            return reason.length() <= 2000 ? reason : reason.substring(0, 2000) + "...";
        }
    }

    /** A byte buffer whose array is reused between entries. */
    private static final class Buffer extends ByteArrayOutputStream {
        Buffer() {
            super(64 * 1024);
        }

        byte[] array() {
            return buf;
        }

        void truncate(int size) {
            count = size;
        }
    }

    /**
     * Checks every frame of a snapshot and notes its entries.
     *
     * @throws IOException when any frame is damaged, the file is cut short, or it is not a snapshot
     */
    static Index check(Path path) throws IOException {
        try (FileChannel ch = FileChannel.open(path, StandardOpenOption.READ)) {
            long size = ch.size();
            long pos = 0;
            long floor = -1;
            long firstPending = -1;
            List<Entry> entries = new ArrayList<>();
            List<Journal.KeptReply> replies = new ArrayList<>();
            boolean ended = false;
            while (pos < size) {
                if (ended) {
                    throw new IOException("bytes after the end frame at offset " + pos);
                }
                byte[] payload = frameAt(ch, pos, size);
                long payloadOffset = pos + FRAME_HEADER_BYTES;
                pos = payloadOffset + payload.length;
                DataInputStream in = new DataInputStream(new java.io.ByteArrayInputStream(payload));
                byte kind = in.readByte();
                if (floor < 0) {
                    if (kind != HEADER || in.readInt() != MAGIC) {
                        throw new IOException("not a snapshot of this format");
                    }
                    floor = in.readLong();
                    firstPending = in.readLong();
                    continue;
                }
                switch (kind) {
                    case STATE -> {
                        String id = in.readUTF();
                        long lastSeq = in.readLong();
                        int consumed = 1 + 2 + utfBytes(id) + 8;
                        entries.add(new Entry(id, STATE, lastSeq, null, payloadOffset + consumed,
                                payload.length - consumed));
                    }
                    case QUARANTINED -> {
                        String id = in.readUTF();
                        long lastSeq = in.readLong();
                        entries.add(new Entry(id, QUARANTINED, lastSeq, in.readUTF(), 0, 0));
                    }
                    case REPLY -> {
                        String id = in.readUTF();
                        long seq = in.readLong();
                        int n = in.readInt();
                        if (n < 0 || n > payload.length) {
                            throw new IOException("a reply of " + n + " bytes in a frame of " + payload.length);
                        }
                        byte[] reply = new byte[n];
                        in.readFully(reply);
                        replies.add(new Journal.KeptReply(id, seq, reply));
                    }
                    case END -> {
                        if (in.readInt() != entries.size() || in.readInt() != replies.size()) {
                            throw new IOException("the end frame counts other entries than the file holds");
                        }
                        ended = true;
                    }
                    default -> throw new IOException("unknown frame kind " + kind + " at offset " + (payloadOffset - 8));
                }
            }
            if (!ended) {
                throw new IOException(floor < 0 ? "empty" : "cut short: no end frame");
            }
            return new Index(path, floor, firstPending, List.copyOf(entries), List.copyOf(replies));
        }
    }

    /**
     * The lowest sequence number a recovery from this snapshot may need (its first pending record),
     * from the header frame alone; 0 when the header cannot be read (then nothing may be deleted).
     */
    static long firstNeededSeq(Path path) {
        try (FileChannel ch = FileChannel.open(path, StandardOpenOption.READ)) {
            DataInputStream in = new DataInputStream(new java.io.ByteArrayInputStream(frameAt(ch, 0, ch.size())));
            if (in.readByte() != HEADER || in.readInt() != MAGIC) {
                return 0;
            }
            long floor = in.readLong();
            return Math.min(floor, in.readLong());
        } catch (IOException | RuntimeException e) {
            return 0;
        }
    }

    /** The state bytes of a STATE entry (read again from the file, and checked again). */
    static byte[] state(Index index, Entry e) throws IOException {
        try (FileChannel ch = FileChannel.open(index.path(), StandardOpenOption.READ)) {
            ByteBuffer b = ByteBuffer.allocate(e.stateLength());
            long at = e.stateOffset();
            while (b.hasRemaining()) {
                int n = ch.read(b, at + b.position());
                if (n < 0) {
                    throw new EOFException("snapshot " + index.path().getFileName() + " shrank while being read");
                }
            }
            return b.array();
        }
    }

    private static byte[] frameAt(FileChannel ch, long pos, long size) throws IOException {
        if (size - pos < FRAME_HEADER_BYTES) {
            throw new IOException("cut short at offset " + pos);
        }
        ByteBuffer header = ByteBuffer.allocate(FRAME_HEADER_BYTES);
        readFully(ch, header, pos);
        int length = header.getInt(0);
        if (length <= 0 || length > MAX_FRAME_BYTES || length > size - pos - FRAME_HEADER_BYTES) {
            throw new IOException("damaged frame length at offset " + pos);
        }
        ByteBuffer payload = ByteBuffer.allocate(length);
        readFully(ch, payload, pos + FRAME_HEADER_BYTES);
        CRC32C c = new CRC32C();
        c.update(payload.array());
        if ((int) c.getValue() != header.getInt(4)) {
            throw new IOException("checksum mismatch in the frame at offset " + pos);
        }
        return payload.array();
    }

    private static void readFully(FileChannel ch, ByteBuffer b, long at) throws IOException {
        while (b.hasRemaining()) {
            if (ch.read(b, at + b.position()) < 0) {
                throw new EOFException();
            }
        }
    }

    /** Bytes of a string in modified UTF-8 (DataOutput.writeUTF), without its 2-byte length. */
    private static int utfBytes(String s) {
        int n = 0;
        for (int i = 0; i < s.length(); i++) {
            char c = s.charAt(i);
            n += c >= 0x0001 && c <= 0x007F ? 1 : c > 0x07FF ? 3 : 2;
        }
        return n;
    }
}
