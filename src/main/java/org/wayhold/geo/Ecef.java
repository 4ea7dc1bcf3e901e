package org.wayhold.geo;

/**
 * Earth-centred, Earth-fixed Cartesian coordinates: origin at the ellipsoid's centre, x towards
 * latitude 0 longitude 0, z towards the north pole, y completing a right-handed frame.
 *
 * @param xM x (metres, finite)
 * @param yM y (metres, finite)
 * @param zM z (metres, finite)
 */
public record Ecef(double xM, double yM, double zM) {

    public Ecef {
        requireFinite("xM", xM);
        requireFinite("yM", yM);
        requireFinite("zM", zM);
    }

    private static void requireFinite(String field, double value) {
        if (!Double.isFinite(value)) {
            throw new IllegalArgumentException(field + ": must be a finite coordinate in metres, was " + value);
        }
    }
}
