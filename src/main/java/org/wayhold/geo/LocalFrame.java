package org.wayhold.geo;

/**
 * A local east-north-up tangent plane on WGS-84 around a fixed origin: east along the parallel,
 * north along the meridian, up along the ellipsoid normal at the origin, all in metres. Immutable
 * and safe to share between threads.
 *
 * <p>The frame is exact (a rotation and shift of ECEF), not a flat-Earth approximation: a point
 * 50 km away is mapped and mapped back to well under 0.1 mm. What grows with distance is the gap
 * between straight-line ENU distance and distance along the surface (about 4 mm at 10 km), which
 * matters for scoring long tracks, not for the conversion itself.
 */
public final class LocalFrame {

    private final Geodetic origin;
    private final Ecef originEcef;
    private final double sinLat0;
    private final double cosLat0;
    private final double sinLon0;
    private final double cosLon0;
    /** Prime-vertical radius at the origin (metres), used by the closed form. */
    private final double n0M;

    /**
     * @param origin the tangent point (WGS-84); its height sets where up = 0
     */
    public LocalFrame(Geodetic origin) {
        this.origin = origin;
        this.originEcef = Wgs84.toEcef(origin);
        double lat0 = Math.toRadians(origin.latDeg());
        double lon0 = Math.toRadians(origin.lonDeg());
        this.sinLat0 = Math.sin(lat0);
        this.cosLat0 = Math.cos(lat0);
        this.sinLon0 = Math.sin(lon0);
        this.cosLon0 = Math.cos(lon0);
        this.n0M = Wgs84.primeVerticalRadiusM(origin.latDeg());
    }

    /** The tangent point (WGS-84). */
    public Geodetic origin() {
        return origin;
    }

    /** The tangent point in ECEF (metres). */
    public Ecef originEcef() {
        return originEcef;
    }

    /**
     * Geodetic to ENU by rotating the ECEF difference (IOGP Publication 373-7-2, EPSG method 9836).
     *
     * @param p a WGS-84 position
     * @return its coordinates in this frame (metres)
     */
    public Enu toEnu(Geodetic p) {
        return toEnu(p.latDeg(), p.lonDeg(), p.altM());
    }

    /**
     * Same as {@link #toEnu(Geodetic)}, for callers holding the three numbers (one call per GNSS fix).
     *
     * @param latDeg latitude (degrees, [-90, 90])
     * @param lonDeg longitude (degrees, [-180, 180])
     * @param altM   ellipsoidal height (metres, finite)
     * @return the point's coordinates in this frame (metres)
     */
    public Enu toEnu(double latDeg, double lonDeg, double altM) {
        Geodetic.requireValid(latDeg, lonDeg, altM);
        double lat = Math.toRadians(latDeg);
        double lon = Math.toRadians(lonDeg);
        double sinLat = Math.sin(lat);
        double cosLat = Math.cos(lat);
        double e2 = Wgs84.FIRST_ECCENTRICITY_SQUARED;
        double n = Wgs84.SEMI_MAJOR_AXIS_M / Math.sqrt(1.0 - e2 * sinLat * sinLat);
        // ECEF of the point (EPSG 9602, as in Ellipsoid.toEcef, written out here so that the per-fix
        // path allocates only its result), then its difference from the origin.
        double r = (n + altM) * cosLat;
        double dx = r * Math.cos(lon) - originEcef.xM();
        double dy = r * Math.sin(lon) - originEcef.yM();
        double dz = ((1.0 - e2) * n + altM) * sinLat - originEcef.zM();
        // [e n u]' = R [dx dy dz]', R rows: (-sin lon0, cos lon0, 0),
        // (-sin lat0 cos lon0, -sin lat0 sin lon0, cos lat0), (cos lat0 cos lon0, cos lat0 sin lon0, sin lat0).
        double t = cosLon0 * dx + sinLon0 * dy;
        return new Enu(-sinLon0 * dx + cosLon0 * dy,
                -sinLat0 * t + cosLat0 * dz,
                cosLat0 * t + sinLat0 * dz);
    }

    /**
     * Geodetic to ENU in the closed form of EPSG method 9837 (IOGP Publication 373-7-2, section
     * "Geographic/topocentric conversions"), which works from latitude and longitude differences
     * instead of ECEF differences. It exists as an independent cross-check of {@link #toEnu(Geodetic)}.
     *
     * @param p a WGS-84 position
     * @return its coordinates in this frame (metres)
     */
    public Enu toEnuClosedForm(Geodetic p) {
        double lat = Math.toRadians(p.latDeg());
        double dLon = Math.toRadians(p.lonDeg() - origin.lonDeg());
        double sinLat = Math.sin(lat);
        double cosLat = Math.cos(lat);
        double e2 = Wgs84.FIRST_ECCENTRICITY_SQUARED;
        double n = Wgs84.primeVerticalRadiusM(p.latDeg());
        double nh = n + p.altM();
        // U = (N + h) cos lat sin dLon
        // V = (N + h)(sin lat cos lat0 - cos lat sin lat0 cos dLon) + e^2 (N0 sin lat0 - N sin lat) cos lat0
        // W = (N + h)(sin lat sin lat0 + cos lat cos lat0 cos dLon) + e^2 (N0 sin lat0 - N sin lat) sin lat0 - (N0 + h0)
        double c = e2 * (n0M * sinLat0 - n * sinLat);
        double cosDLon = Math.cos(dLon);
        return new Enu(nh * cosLat * Math.sin(dLon),
                nh * (sinLat * cosLat0 - cosLat * sinLat0 * cosDLon) + c * cosLat0,
                nh * (sinLat * sinLat0 + cosLat * cosLat0 * cosDLon) + c * sinLat0 - (n0M + origin.altM()));
    }

    /**
     * ENU to geodetic: rotate back to an ECEF difference, add the origin, convert with
     * {@link Wgs84#toGeodetic(Ecef)}.
     *
     * @param p coordinates in this frame (metres)
     * @return the WGS-84 position
     */
    public Geodetic toGeodetic(Enu p) {
        return toGeodetic(p.eastM(), p.northM(), p.upM());
    }

    /**
     * Same as {@link #toGeodetic(Enu)}, for callers holding the three numbers.
     *
     * @param eastM  east (metres, finite)
     * @param northM north (metres, finite)
     * @param upM    up (metres, finite)
     * @return the WGS-84 position
     */
    public Geodetic toGeodetic(double eastM, double northM, double upM) {
        if (!(Double.isFinite(eastM) && Double.isFinite(northM) && Double.isFinite(upM))) {
            throw new IllegalArgumentException("eastM, northM, upM: must be finite metres, were "
                    + eastM + ", " + northM + ", " + upM);
        }
        // [dx dy dz]' = R' [e n u]'
        double t = -sinLat0 * northM + cosLat0 * upM;
        double dx = -sinLon0 * eastM + cosLon0 * t;
        double dy = cosLon0 * eastM + sinLon0 * t;
        double dz = cosLat0 * northM + sinLat0 * upM;
        return Ellipsoid.WGS84.toGeodetic(originEcef.xM() + dx, originEcef.yM() + dy, originEcef.zM() + dz);
    }

    @Override
    public String toString() {
        return "LocalFrame[origin=" + origin + "]";
    }
}
