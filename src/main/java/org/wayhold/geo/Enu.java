package org.wayhold.geo;

/**
 * Coordinates in a local east-north-up tangent plane (see {@link LocalFrame}).
 *
 * @param eastM  along the local east (metres, finite)
 * @param northM along the local north (metres, finite)
 * @param upM    along the ellipsoid normal at the frame's origin (metres, finite)
 */
public record Enu(double eastM, double northM, double upM) {

    public Enu {
        requireFinite("eastM", eastM);
        requireFinite("northM", northM);
        requireFinite("upM", upM);
    }

    /** Distance in the east-north plane from the frame's origin (metres). */
    public double horizontalM() {
        return Math.hypot(eastM, northM);
    }

    private static void requireFinite(String field, double value) {
        if (!Double.isFinite(value)) {
            throw new IllegalArgumentException(field + ": must be a finite coordinate in metres, was " + value);
        }
    }
}
