package org.wayhold.geo;

/**
 * An ellipsoid of revolution, with the conversions between geodetic and Earth-centred coordinates
 * on it. {@link Wgs84} is this class at {@link #WGS84}; {@link #GRS80} is here so that published
 * examples on that ellipsoid (for instance the Ordnance Survey's) can be checked.
 *
 * @param name           a label for messages, such as {@code "WGS-84"}
 * @param semiMajorAxisM equatorial radius a (metres, positive)
 * @param flattening     f = (a - b) / a (unitless, in [0, 1))
 */
public record Ellipsoid(String name, double semiMajorAxisM, double flattening) {

    /** WGS-84, with the defining constants held in {@link Wgs84}. */
    public static final Ellipsoid WGS84 = new Ellipsoid("WGS-84", Wgs84.SEMI_MAJOR_AXIS_M, Wgs84.FLATTENING);

    /**
     * GRS 1980: a = 6378137 m, 1/f = 298.257222101 (Moritz, "Geodetic Reference System 1980",
     * Bulletin Géodésique 54, 1980; the defining constant is J2, and 1/f to this precision is the
     * derived value quoted by the Ordnance Survey and the EPSG dataset, code 7019).
     */
    public static final Ellipsoid GRS80 = new Ellipsoid("GRS 1980", 6378137.0, 1 / 298.257222101);

    public Ellipsoid {
        if (name == null || name.isBlank()) {
            throw new IllegalArgumentException("name: must not be blank, was " + name);
        }
        if (!(semiMajorAxisM > 0.0) || Double.isInfinite(semiMajorAxisM)) {
            throw new IllegalArgumentException("semiMajorAxisM: must be a positive finite length in metres, was "
                    + semiMajorAxisM);
        }
        if (!(flattening >= 0.0 && flattening < 1.0)) {
            throw new IllegalArgumentException("flattening: must be within [0, 1), was " + flattening);
        }
    }

    /** Polar radius b = a (1 - f) (metres). */
    public double semiMinorAxisM() {
        return semiMajorAxisM * (1.0 - flattening);
    }

    /** e^2 = f (2 - f) = (a^2 - b^2) / a^2 (unitless). */
    public double firstEccentricitySquared() {
        return flattening * (2.0 - flattening);
    }

    /** e'^2 = e^2 / (1 - e^2) = (a^2 - b^2) / b^2 (unitless). */
    public double secondEccentricitySquared() {
        double e2 = firstEccentricitySquared();
        return e2 / (1.0 - e2);
    }

    /**
     * Radius of curvature in the meridian, M = a (1 - e^2) / (1 - e^2 sin^2 lat)^(3/2): one degree
     * of latitude is M * pi / 180 metres long.
     *
     * @param latDeg latitude (degrees, [-90, 90])
     * @return M (metres)
     */
    public double meridianRadiusM(double latDeg) {
        requireLatitude(latDeg);
        double e2 = firstEccentricitySquared();
        double s = Math.sin(Math.toRadians(latDeg));
        double w2 = 1.0 - e2 * s * s;
        return semiMajorAxisM * (1.0 - e2) / (w2 * Math.sqrt(w2));
    }

    /**
     * Radius of curvature in the prime vertical, N = a / sqrt(1 - e^2 sin^2 lat): one degree of
     * longitude is N cos(lat) * pi / 180 metres long.
     *
     * @param latDeg latitude (degrees, [-90, 90])
     * @return N (metres)
     */
    public double primeVerticalRadiusM(double latDeg) {
        requireLatitude(latDeg);
        double s = Math.sin(Math.toRadians(latDeg));
        return semiMajorAxisM / Math.sqrt(1.0 - firstEccentricitySquared() * s * s);
    }

    /**
     * Geodetic to Earth-centred coordinates (IOGP Publication 373-7-2, EPSG method 9602):
     * X = (N + h) cos(lat) cos(lon), Y = (N + h) cos(lat) sin(lon), Z = ((1 - e^2) N + h) sin(lat).
     *
     * @param g position on this ellipsoid
     * @return the same point in ECEF (metres)
     */
    public Ecef toEcef(Geodetic g) {
        double lat = Math.toRadians(g.latDeg());
        double lon = Math.toRadians(g.lonDeg());
        double sinLat = Math.sin(lat);
        double cosLat = Math.cos(lat);
        double n = semiMajorAxisM / Math.sqrt(1.0 - firstEccentricitySquared() * sinLat * sinLat);
        double r = (n + g.altM()) * cosLat;
        return new Ecef(r * Math.cos(lon), r * Math.sin(lon),
                ((1.0 - firstEccentricitySquared()) * n + g.altM()) * sinLat);
    }

    /**
     * Earth-centred to geodetic coordinates, in closed form after H. Vermeille, "Direct
     * transformation from geocentric coordinates to geodetic coordinates", Journal of Geodesy 76
     * (2002) 451-454. The formula is exact (no iteration); in double precision it inverts
     * {@link #toEcef} to a few nanometres for heights from -1 km to +50 km at any latitude,
     * the poles included, where its half-angle form for the latitude avoids the division by
     * cos(lat) of the textbook iterations.
     *
     * <p>The formula holds outside the evolute of the meridian ellipse, a region of about 43 km
     * around the Earth's centre; points inside the ellipse through the evolute's cusps (which
     * contains it) are rejected.
     *
     * @param e a point (metres), farther than about 43 km from the centre
     * @return the geodetic position on this ellipsoid (lat, lon in degrees, height in metres)
     * @throws IllegalArgumentException for a point within about 43 km of the ellipsoid's centre
     */
    public Geodetic toGeodetic(Ecef e) {
        return toGeodetic(e.xM(), e.yM(), e.zM());
    }

    Geodetic toGeodetic(double xM, double yM, double zM) {
        double a = semiMajorAxisM;
        double e2 = firstEccentricitySquared();
        double e4 = e2 * e2;
        double rho2 = xM * xM + yM * yM;
        double rho = Math.sqrt(rho2);
        // Vermeille (2002) eq. 1-9, with p and q made dimensionless by a^2.
        double p = rho2 / (a * a);
        double q = (1.0 - e2) * zM * zM / (a * a);
        double r = (p + q - e4) / 6.0;
        if (!(r > 0.0)) {
            throw new IllegalArgumentException("ECEF point (" + xM + ", " + yM + ", " + zM + ") m lies within about "
                    + Math.round(a * e2 / 1000.0) + " km of the centre of " + name
                    + ", where the closed-form conversion does not apply");
        }
        double s = e4 * p * q / (4.0 * r * r * r);
        double t = Math.cbrt(1.0 + s + Math.sqrt(s * (2.0 + s)));
        double u = r * (1.0 + t + 1.0 / t);
        double v = Math.sqrt(u * u + e4 * q);
        double w = e2 * (u + v - q) / (2.0 * v);
        double k = Math.sqrt(u + v + w * w) - w;
        double d = k * rho / (k + e2);
        double dz = Math.hypot(d, zM);
        // The half-angle form 2 atan2(z, D + sqrt(D^2 + z^2)) stays accurate at the poles (D = 0).
        double latDeg = Math.toDegrees(2.0 * Math.atan2(zM, d + dz));
        double lonDeg = Math.toDegrees(Math.atan2(yM, xM));
        double hM = (k + e2 - 1.0) / k * dz;
        // toDegrees(pi/2) and toDegrees(pi) can round one ulp past the limits the record enforces.
        return new Geodetic(clamp(latDeg, 90.0), clamp(lonDeg, 180.0), hM);
    }

    private static double clamp(double valueDeg, double limitDeg) {
        return Math.max(-limitDeg, Math.min(limitDeg, valueDeg));
    }

    private static void requireLatitude(double latDeg) {
        if (!(latDeg >= -90.0 && latDeg <= 90.0)) {
            throw new IllegalArgumentException("latDeg: must be within [-90, 90] degrees, was " + latDeg);
        }
    }
}
