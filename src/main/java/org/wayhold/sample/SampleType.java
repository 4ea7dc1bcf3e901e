package org.wayhold.sample;

import java.io.IOException;
import java.util.Arrays;
import java.util.Comparator;
import java.util.stream.Collectors;

/**
 * The kinds of sample, with everything that names or orders them in one place: the wire name of the
 * NDJSON {@code type} field, the processing rank among samples of the same time, the type byte of the
 * binary form (journals and snapshots) and the label of the {@code type} metric.
 *
 * <p>Ranks: at equal times inputs come before fixes, so a fix is always applied to a state that has
 * seen the inputs of its own instant; among inputs the yaw rate comes first, as loggers (and the
 * simulator) usually write it, so that a batch boundary between the two costs no re-filtering.
 * Reference points come last: they are never fed to the filter.
 *
 * <p>Persistence: the codec bytes are written in journals and must never change. The declaration
 * order is the slot order of per-type counters in session snapshots; a new type goes at the end.
 */
public enum SampleType {
    WHEEL_SPEED("wheel_speed", 1, (byte) 2),
    YAW_RATE("yaw_rate", 0, (byte) 3),
    GNSS("gnss", 2, (byte) 1),
    REFERENCE("reference", 3, (byte) 4);

    private static final SampleType[] BY_CODEC_BYTE = new SampleType[5];

    /** The wire names in codec-byte order, the order of the contract's sample table, for messages. */
    private static final String LISTED = Arrays.stream(values())
            .sorted(Comparator.comparingInt(SampleType::codecByte))
            .map(SampleType::wireName)
            .collect(Collectors.joining(", "));

    static {
        for (SampleType t : values()) {
            BY_CODEC_BYTE[t.codecByte] = t;
        }
    }

    private final String wireName;
    private final int rank;
    private final byte codecByte;

    SampleType(String wireName, int rank, byte codecByte) {
        this.wireName = wireName;
        this.rank = rank;
        this.codecByte = codecByte;
    }

    /** The name in the NDJSON {@code type} field, for example {@code "wheel_speed"}. */
    public String wireName() {
        return wireName;
    }

    /** Processing rank among samples of the same time: lower is applied first. */
    public int rank() {
        return rank;
    }

    /** The type byte of the binary form ({@link SampleCodec}). */
    public byte codecByte() {
        return codecByte;
    }

    /** The value of the {@code type} label on sample metrics: the wire name. */
    public String metricLabel() {
        return wireName;
    }

    /** Every wire name, comma-separated, as the contract lists them ({@code "gnss, wheel_speed, ..."}). */
    public static String listed() {
        return LISTED;
    }

    /**
     * The type of a codec byte.
     *
     * @throws IOException when the byte names no type (the bytes are not a sample)
     */
    public static SampleType fromCodecByte(byte b) throws IOException {
        SampleType t = b >= 0 && b < BY_CODEC_BYTE.length ? BY_CODEC_BYTE[b] : null;
        if (t == null) {
            throw new IOException("sample: unknown type code " + b);
        }
        return t;
    }
}
