package org.wayhold.simulate;

import org.wayhold.settings.Check;

/**
 * A visit to a multi-storey garage with a helical ramp, as one stretch of the route. GNSS is denied
 * from the entrance to the exit. The car slows to {@code speedMps}, enters, climbs {@code storeys}
 * storeys of {@code storeyHeightM} on a helix of radius {@code radiusM} (one full turn per storey, so
 * the grade is atan(storeyHeightM / (2 pi radiusM)), 4.0% with the defaults; the road is not banked),
 * drives onto the top deck, stops in a bay for {@code parkS}, backs out 5 m, turns round and descends
 * the same helix turning the other way, and leaves. The climb and the descent are each entered and
 * left through 2 s ramps of grade and yaw rate; the truth's height follows from integrating speed
 * times the sine of the grade, and the {@code reference} lines carry it as altitude.
 *
 * @param enabled       whether the route visits the garage
 * @param storeys       storeys climbed (>= 1)
 * @param storeyHeightM height of one storey (m, > 0)
 * @param radiusM       radius of the helix, horizontally (m, >= 5)
 * @param speedMps      speed on the ramp (m/s, > 0)
 * @param parkS         standstill in the bay (s, > 0)
 */
public record Garage(boolean enabled, int storeys, double storeyHeightM, double radiusM, double speedMps, double parkS) {

    /**
     * Five storeys of 3 m on a 12 m helix at 3.5 m/s (12.6 km/h), parked for 90 s: storeys of about 3 m,
     * helices of 10-15 m radius and a 10-15 km/h limit are usual for garages (common practice). The visit
     * takes 340.6 s from entrance to exit.
     */
    public static Garage off() {
        return new Garage(false, 5, 3.0, 12.0, 3.5, 90.0);
    }

    public Garage {
        Check.atLeast("route.garage.storeys", storeys, 1);
        Check.positive("route.garage.storeyHeightM", storeyHeightM, "m");
        if (!(radiusM >= 5.0) || Double.isInfinite(radiusM)) {
            // About the tightest circle a car can drive (common practice).
            throw new IllegalArgumentException("route.garage.radiusM: must be a finite number of m >= 5, was " + radiusM);
        }
        Check.positive("route.garage.speedMps", speedMps, "m/s");
        Check.positive("route.garage.parkS", parkS, "s");
        if (storeyHeightM > radiusM) {
            throw new IllegalArgumentException("route.garage.storeyHeightM: " + storeyHeightM
                    + " m per turn of a " + radiusM + " m helix is steeper than any ramp (more than 16%)");
        }
    }

    /** The same magnitudes, switched on. */
    public Garage on() {
        return new Garage(true, storeys, storeyHeightM, radiusM, speedMps, parkS);
    }

    /** The same magnitudes, switched on or off. */
    public Garage withEnabled(boolean value) {
        return new Garage(value, storeys, storeyHeightM, radiusM, speedMps, parkS);
    }

    /** This many storeys, switched on. */
    public Garage withStoreys(int value) {
        return new Garage(true, value, storeyHeightM, radiusM, speedMps, parkS);
    }

    /** This parking standstill (s), switched on. */
    public Garage withParkS(double value) {
        return new Garage(true, storeys, storeyHeightM, radiusM, speedMps, value);
    }

    /** This helix radius (m), switched on. */
    public Garage withRadiusM(double value) {
        return new Garage(true, storeys, storeyHeightM, value, speedMps, parkS);
    }

    /** This storey height (m), switched on. */
    public Garage withStoreyHeightM(double value) {
        return new Garage(true, storeys, value, radiusM, speedMps, parkS);
    }

    /** The grade of the helix (rad): one storey per full turn. */
    public double helixGradeRad() {
        return StrictMath.atan(storeyHeightM / (2.0 * Math.PI * radiusM));
    }
}
