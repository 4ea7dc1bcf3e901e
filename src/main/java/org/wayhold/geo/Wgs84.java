package org.wayhold.geo;

/**
 * The WGS-84 ellipsoid (NIMA TR8350.2, "Department of Defense World Geodetic System 1984", 3rd
 * edition, 2000, tables 3.1 and 3.3) and the conversions on it. Each method delegates to
 * {@link Ellipsoid#WGS84}; use {@link Ellipsoid} directly for another ellipsoid.
 */
public final class Wgs84 {

    /** a (metres), a defining parameter (TR8350.2 table 3.1). */
    public static final double SEMI_MAJOR_AXIS_M = 6378137.0;
    /** f (unitless), a defining parameter (TR8350.2 table 3.1). */
    public static final double FLATTENING = 1 / 298.257223563;
    /** b = a (1 - f) = 6356752.3142 m (TR8350.2 table 3.3). */
    public static final double SEMI_MINOR_AXIS_M = Ellipsoid.WGS84.semiMinorAxisM();
    /** e^2 = f (2 - f) = 6.69437999014e-3 (TR8350.2 table 3.3). */
    public static final double FIRST_ECCENTRICITY_SQUARED = Ellipsoid.WGS84.firstEccentricitySquared();
    /** e'^2 = e^2 / (1 - e^2) = 6.73949674228e-3 (TR8350.2 table 3.3). */
    public static final double SECOND_ECCENTRICITY_SQUARED = Ellipsoid.WGS84.secondEccentricitySquared();

    private Wgs84() {
    }

    /** Geodetic to ECEF on WGS-84; see {@link Ellipsoid#toEcef(Geodetic)}. */
    public static Ecef toEcef(Geodetic g) {
        return Ellipsoid.WGS84.toEcef(g);
    }

    /**
     * ECEF to geodetic on WGS-84, in closed form (Vermeille 2002); see
     * {@link Ellipsoid#toGeodetic(Ecef)}. Accurate to well under 0.1 mm for heights from -1 km to
     * +50 km at every latitude, poles included.
     */
    public static Geodetic toGeodetic(Ecef e) {
        return Ellipsoid.WGS84.toGeodetic(e);
    }

    /** Meridian radius of curvature M at {@code latDeg} (degrees) in metres; see {@link Ellipsoid#meridianRadiusM}. */
    public static double meridianRadiusM(double latDeg) {
        return Ellipsoid.WGS84.meridianRadiusM(latDeg);
    }

    /** Prime-vertical radius of curvature N at {@code latDeg} (degrees) in metres; see {@link Ellipsoid#primeVerticalRadiusM}. */
    public static double primeVerticalRadiusM(double latDeg) {
        return Ellipsoid.WGS84.primeVerticalRadiusM(latDeg);
    }
}
