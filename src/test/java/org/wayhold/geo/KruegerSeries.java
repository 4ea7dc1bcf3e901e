package org.wayhold.geo;

/**
 * An independent transverse Mercator, used only as a test oracle for {@link ProjectedCrs}: the
 * Krüger series in the form of C. F. F. Karney, "Transverse Mercator with an accuracy of a few
 * nanometers", Journal of Geodesy 85 (2011) 475-485, eqs. 7, 9 and 35, to fourth order in the third
 * flattening n (truncation error below 1e-7 m). Proj4J uses a different (older) series, so the two
 * share no code. The formulas were written from memory and are checked against two published
 * worked examples in {@link ProjectedCrsTest}.
 *
 * @param semiMajorAxisM  a (metres)
 * @param flattening      f
 * @param scaleFactor     k0 on the central meridian
 * @param originLatDeg    latitude of natural origin (degrees)
 * @param centralLonDeg   longitude of natural origin (degrees)
 * @param falseEastingM   false easting (metres)
 * @param falseNorthingM  false northing (metres)
 */
record KruegerSeries(double semiMajorAxisM, double flattening, double scaleFactor, double originLatDeg,
                     double centralLonDeg, double falseEastingM, double falseNorthingM) {

    /** UTM zone on WGS-84 (k0 = 0.9996, false easting 500 km, false northing 0 or 10 000 km). */
    static KruegerSeries utmWgs84(int zone, boolean north) {
        return new KruegerSeries(Wgs84.SEMI_MAJOR_AXIS_M, Wgs84.FLATTENING, 0.9996, 0.0, zone * 6.0 - 183.0,
                500000.0, north ? 0.0 : 10000000.0);
    }

    /** {easting, northing} in metres. */
    double[] project(double latDeg, double lonDeg) {
        double[] p = unscaled(Math.toRadians(latDeg), Math.toRadians(lonDeg - centralLonDeg));
        double[] origin = unscaled(Math.toRadians(originLatDeg), 0.0);
        return new double[] {
                falseEastingM + scaleFactor * p[0],
                falseNorthingM + scaleFactor * (p[1] - origin[1])};
    }

    private double[] unscaled(double lat, double dLon) {
        double n = flattening / (2.0 - flattening);
        double n2 = n * n;
        double n3 = n2 * n;
        double n4 = n3 * n;
        // Rectifying radius A = a / (1 + n) (1 + n^2/4 + n^4/64)
        double rectifyingRadiusM = semiMajorAxisM / (1.0 + n) * (1.0 + n2 / 4.0 + n4 / 64.0);
        double[] alpha = {
                n / 2.0 - 2.0 * n2 / 3.0 + 5.0 * n3 / 16.0 + 41.0 * n4 / 180.0,
                13.0 * n2 / 48.0 - 3.0 * n3 / 5.0 + 557.0 * n4 / 1440.0,
                61.0 * n3 / 240.0 - 103.0 * n4 / 140.0,
                49561.0 * n4 / 161280.0};
        double e = 2.0 * Math.sqrt(n) / (1.0 + n);
        double sinLat = Math.sin(lat);
        // Conformal latitude: tan chi = sinh(atanh(sin lat) - e atanh(e sin lat))
        double tanChi = Math.sinh(atanh(sinLat) - e * atanh(e * sinLat));
        double xi = Math.atan2(tanChi, Math.cos(dLon));
        double eta = atanh(Math.sin(dLon) / Math.sqrt(1.0 + tanChi * tanChi));
        double east = eta;
        double north = xi;
        for (int j = 1; j <= 4; j++) {
            east += alpha[j - 1] * Math.cos(2 * j * xi) * Math.sinh(2 * j * eta);
            north += alpha[j - 1] * Math.sin(2 * j * xi) * Math.cosh(2 * j * eta);
        }
        return new double[] {rectifyingRadiusM * east, rectifyingRadiusM * north};
    }

    private static double atanh(double x) {
        return 0.5 * Math.log((1.0 + x) / (1.0 - x));
    }
}
