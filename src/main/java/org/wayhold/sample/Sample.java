package org.wayhold.sample;

/** One timestamped sample from a vehicle. {@code t} is seconds on the vehicle's clock. */
public sealed interface Sample permits GnssFix, WheelSpeed, YawRate, ReferencePoint {

    /** Sample time (seconds on the vehicle's clock). */
    double t();

    /** This sample's type: its wire name, ordering rank and binary type byte. */
    SampleType type();

    /** Rejects a time that cannot be placed on a timeline. */
    static void requireFiniteTime(double t) {
        if (!Double.isFinite(t)) {
            throw new IllegalArgumentException("t: must be a finite number of seconds, was " + t);
        }
    }
}
