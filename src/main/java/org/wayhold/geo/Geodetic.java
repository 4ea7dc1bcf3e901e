package org.wayhold.geo;

/**
 * A geodetic position on an ellipsoid (WGS-84 unless a method says otherwise).
 *
 * @param latDeg latitude (degrees, [-90, 90], positive north)
 * @param lonDeg longitude (degrees, [-180, 180], positive east); out-of-range values are rejected,
 *               not wrapped, because a longitude outside the range almost always means swapped or
 *               corrupted fields upstream
 * @param altM   ellipsoidal height (metres, finite)
 */
public record Geodetic(double latDeg, double lonDeg, double altM) {

    public Geodetic {
        requireValid(latDeg, lonDeg, altM);
    }

    /** The checks of the compact constructor, for callers that take the three numbers unboxed. */
    static void requireValid(double latDeg, double lonDeg, double altM) {
        if (!(latDeg >= -90.0 && latDeg <= 90.0)) {
            throw new IllegalArgumentException("latDeg: must be within [-90, 90] degrees, was " + latDeg);
        }
        if (!(lonDeg >= -180.0 && lonDeg <= 180.0)) {
            throw new IllegalArgumentException("lonDeg: must be within [-180, 180] degrees, was " + lonDeg);
        }
        if (!Double.isFinite(altM)) {
            throw new IllegalArgumentException("altM: must be a finite height in metres, was " + altM);
        }
    }
}
