package org.wayhold.sample;

/** One timestamped sample from a vehicle. {@code t} is seconds on the vehicle's clock. */
public sealed interface Sample permits GnssFix, WheelSpeed, YawRate, ReferencePoint {

    /** Sample time (seconds on the vehicle's clock). */
    double t();

    /** The wire name of this sample's type, as in the NDJSON {@code type} field. */
    String typeName();

    /** Rejects a time that cannot be placed on a timeline. */
    static void requireFiniteTime(double t) {
        if (!Double.isFinite(t)) {
            throw new IllegalArgumentException("t: must be a finite number of seconds, was " + t);
        }
    }
}
