package org.wayhold.sample;

import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;

/**
 * A compact binary form of samples for journals and snapshots: a type byte, then the fields as IEEE 754
 * doubles (absent fields as NaN, as in the records), so a sample reads back bit-identical.
 */
public final class SampleCodec {

    private SampleCodec() {
    }

    public static void write(DataOutput out, Sample sample) throws IOException {
        out.writeByte(sample.type().codecByte());
        if (sample instanceof GnssFix g) {
            out.writeDouble(g.t());
            out.writeDouble(g.latDeg());
            out.writeDouble(g.lonDeg());
            out.writeDouble(g.altM());
            out.writeDouble(g.sigmaHM());
            out.writeDouble(g.sigmaVM());
            out.writeByte(g.fix().ordinal());
            out.writeInt(g.sats());
            out.writeDouble(g.hdop());
            out.writeDouble(g.speedMps());
            out.writeDouble(g.courseDeg());
        } else if (sample instanceof WheelSpeed w) {
            out.writeDouble(w.t());
            out.writeDouble(w.speedMps());
        } else if (sample instanceof YawRate y) {
            out.writeDouble(y.t());
            out.writeDouble(y.yawRateRadPerS());
        } else if (sample instanceof ReferencePoint r) {
            out.writeDouble(r.t());
            out.writeDouble(r.latDeg());
            out.writeDouble(r.lonDeg());
            out.writeDouble(r.altM());
            out.writeDouble(r.headingDeg());
        }
    }

    /**
     * @throws IOException when the bytes are not a sample (unknown type byte, or values a record refuses)
     */
    public static Sample read(DataInput in) throws IOException {
        SampleType type = SampleType.fromCodecByte(in.readByte());
        try {
            switch (type) {
                case GNSS -> {
                    double t = in.readDouble();
                    double lat = in.readDouble();
                    double lon = in.readDouble();
                    double alt = in.readDouble();
                    double sigmaH = in.readDouble();
                    double sigmaV = in.readDouble();
                    int fix = in.readByte();
                    if (fix < 0 || fix >= FixType.values().length) {
                        throw new IOException("sample: unknown fix type code " + fix);
                    }
                    int sats = in.readInt();
                    double hdop = in.readDouble();
                    double speed = in.readDouble();
                    double course = in.readDouble();
                    return new GnssFix(t, lat, lon, alt, sigmaH, sigmaV, FixType.values()[fix], sats, hdop, speed,
                            course);
                }
                case WHEEL_SPEED -> {
                    return new WheelSpeed(in.readDouble(), in.readDouble());
                }
                case YAW_RATE -> {
                    return new YawRate(in.readDouble(), in.readDouble());
                }
                case REFERENCE -> {
                    return new ReferencePoint(in.readDouble(), in.readDouble(), in.readDouble(), in.readDouble(),
                            in.readDouble());
                }
                default -> throw new IllegalStateException("sample: no binary form for type " + type);
            }
        } catch (IllegalArgumentException e) {
            throw new IOException("sample: " + e.getMessage(), e);
        }
    }
}
