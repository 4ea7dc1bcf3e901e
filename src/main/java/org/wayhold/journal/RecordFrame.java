package org.wayhold.journal;

import java.nio.ByteBuffer;
import java.util.zip.CRC32C;

/**
 * The framing of one journal record: {@code [length u32][CRC32C u32][payload]}, the payload starting
 * with the record's sequence number {@code [seq u64][kind u8]...} and the checksum covering the whole
 * payload (CRC32C, RFC 3720 sec. 12.1). All integers big-endian.
 *
 * <p>Why the sequence number is in every record: it lets recovery tell exactly which records a damaged
 * stretch of a segment held, resume at the next intact record, and see a missing segment as a gap in
 * the numbers, instead of giving up at the first bad byte.
 */
final class RecordFrame {

    /** Length and checksum (bytes). */
    static final int HEADER_BYTES = 8;
    /** Offset of the sequence number in a frame (bytes). */
    static final int SEQ_OFFSET = HEADER_BYTES;
    /** Offset of the kind byte in a frame (bytes). */
    static final int KIND_OFFSET = HEADER_BYTES + 8;
    /** Sequence number and kind (bytes). */
    static final int MIN_PAYLOAD_BYTES = 9;
    /**
     * Smallest whole record (bytes): header, sequence number, kind and the shortest further content
     * (a deletion of a one-character vehicle id: 2-byte length and 1 byte).
     */
    static final int MIN_RECORD_BYTES = HEADER_BYTES + MIN_PAYLOAD_BYTES + 3;
    /** Largest record accepted when reading (bytes): anything longer is a corrupt length field. */
    static final int MAX_PAYLOAD_BYTES = 256 * 1024 * 1024;

    private RecordFrame() {
    }

    /**
     * A frame of {@code payloadBytes} payload bytes (sequence number and kind included) with the length
     * filled in; the caller writes the rest from {@link #KIND_OFFSET} on, then {@link #seal}s it.
     */
    static byte[] allocate(int payloadBytes) {
        byte[] frame = new byte[HEADER_BYTES + payloadBytes];
        ByteBuffer.wrap(frame).putInt(0, payloadBytes);
        return frame;
    }

    /** Sets the sequence number and the checksum over the whole payload. */
    static void seal(byte[] frame, long seq) {
        ByteBuffer b = ByteBuffer.wrap(frame);
        b.putLong(SEQ_OFFSET, seq);
        CRC32C c = new CRC32C();
        c.update(frame, HEADER_BYTES, frame.length - HEADER_BYTES);
        b.putInt(4, (int) c.getValue());
    }

    /**
     * The length of the whole valid frame at {@code pos}, or -1: the header must fit, the length be
     * plausible and fit in {@code limit}, the sequence number lie in {@code [minSeq, maxSeqExclusive)}
     * (checked before the checksum, which is the costly part) and the checksum match.
     */
    static int validAt(byte[] bytes, int pos, int limit, long minSeq, long maxSeqExclusive) {
        if (limit - pos < HEADER_BYTES + MIN_PAYLOAD_BYTES) {
            return -1;
        }
        ByteBuffer b = ByteBuffer.wrap(bytes);
        int length = b.getInt(pos);
        if (length < MIN_PAYLOAD_BYTES || length > MAX_PAYLOAD_BYTES || length > limit - pos - HEADER_BYTES) {
            return -1;
        }
        long seq = b.getLong(pos + SEQ_OFFSET);
        if (seq < minSeq || seq >= maxSeqExclusive) {
            return -1;
        }
        CRC32C c = new CRC32C();
        c.update(bytes, pos + HEADER_BYTES, length);
        if ((int) c.getValue() != b.getInt(pos + 4)) {
            return -1;
        }
        return HEADER_BYTES + length;
    }

    /**
     * True when the frame at {@code pos} is a record of the earlier layout, which had no sequence number:
     * its checksum matches and its payload starts with a kind of that layout (1 a batch, 2 a deletion,
     * 3 a kept reply), which as the first byte of a sequence number would mean a number of at least 2^56.
     */
    static boolean earlierLayoutAt(byte[] bytes, int pos, int limit) {
        if (limit - pos < HEADER_BYTES + 1) {
            return false;
        }
        ByteBuffer b = ByteBuffer.wrap(bytes);
        int length = b.getInt(pos);
        byte kind = length < 1 ? 0 : bytes[pos + HEADER_BYTES];
        if (length < 1 || length > limit - pos - HEADER_BYTES || kind < 1 || kind > 3) {
            return false;
        }
        CRC32C c = new CRC32C();
        c.update(bytes, pos + HEADER_BYTES, length);
        return (int) c.getValue() == b.getInt(pos + 4);
    }

    static long seqAt(byte[] bytes, int pos) {
        return ByteBuffer.wrap(bytes).getLong(pos + SEQ_OFFSET);
    }

    static byte kindAt(byte[] bytes, int pos) {
        return bytes[pos + KIND_OFFSET];
    }

    /**
     * True when the bytes from {@code pos} to the end can be one record cut short by a crash: too few
     * for a header, or a header whose length runs to or past the end. Only such a tail is a torn write;
     * anything else is damage.
     */
    static boolean tornTail(byte[] bytes, int pos, int limit) {
        if (limit - pos < HEADER_BYTES) {
            return true;
        }
        int length = ByteBuffer.wrap(bytes).getInt(pos);
        return length >= MIN_PAYLOAD_BYTES && length <= MAX_PAYLOAD_BYTES
                && (long) pos + HEADER_BYTES + length >= limit;
    }
}
