package org.wayhold.geo;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;
import static org.assertj.core.api.Assertions.within;

import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.locationtech.proj4j.ProjCoordinate;
import org.locationtech.proj4j.datum.GeocentricConverter;

class Wgs84Test {

    /** Published examples are given to 1 mm, so that is the tolerance for checks against them. */
    private static final double PUBLISHED_MM = 0.001;
    /** The project's accuracy target for the ECEF-to-geodetic inverse. */
    private static final double ROUND_TRIP_M = 1e-4;

    /** Degrees, minutes, seconds of a non-negative angle to decimal degrees; negate the result for S or W. */
    static double dms(double deg, double min, double sec) {
        return deg + min / 60.0 + sec / 3600.0;
    }

    @Test
    void derivedConstantsMatchTheTablesOfTr8350() {
        // NIMA TR8350.2, 3rd edition, table 3.3 (derived geometric constants).
        assertThat(Wgs84.SEMI_MINOR_AXIS_M).isCloseTo(6356752.3142, within(1e-4));
        assertThat(Wgs84.FIRST_ECCENTRICITY_SQUARED).isCloseTo(6.69437999014e-3, within(1e-14));
        assertThat(Wgs84.SECOND_ECCENTRICITY_SQUARED).isCloseTo(6.73949674228e-3, within(1e-14));
    }

    @Test
    void geodeticToEcefMatchesTheIogpExampleForMethod9602() {
        // IOGP Publication 373-7-2, EPSG method 9602 example (WGS 84):
        // 53°48'33.820"N, 2°07'46.380"E, h = 73.0 m -> X 3771793.968, Y 140253.342, Z 5124304.349 m.
        Ecef e = Wgs84.toEcef(new Geodetic(dms(53, 48, 33.820), dms(2, 7, 46.380), 73.0));
        assertThat(e.xM()).isCloseTo(3771793.968, within(PUBLISHED_MM));
        assertThat(e.yM()).isCloseTo(140253.342, within(PUBLISHED_MM));
        assertThat(e.zM()).isCloseTo(5124304.349, within(PUBLISHED_MM));
    }

    @Test
    void ecefToGeodeticRecoversTheIogpExampleForMethod9602() {
        // IOGP Publication 373-7-2, EPSG method 9602, the reverse direction of the same example.
        Geodetic g = Wgs84.toGeodetic(new Ecef(3771793.968, 140253.342, 5124304.349));
        // The published ECEF is rounded to 1 mm; 1 mm is about 1e-8 degrees of latitude.
        assertThat(g.latDeg()).isCloseTo(dms(53, 48, 33.820), within(2e-8));
        assertThat(g.lonDeg()).isCloseTo(dms(2, 7, 46.380), within(2e-8));
        assertThat(g.altM()).isCloseTo(73.0, within(PUBLISHED_MM));
    }

    @Test
    void geodeticToEcefOnGrs80MatchesTheOrdnanceSurveyExample() {
        // Ordnance Survey, "A guide to coordinate systems in Great Britain", worked example on GRS80:
        // 53°36'43.1653"N, 1°39'51.9920"W, h = 299.800 m -> 3790644.900, -110149.210, 5111482.970 m.
        Ecef e = Ellipsoid.GRS80.toEcef(new Geodetic(dms(53, 36, 43.1653), -dms(1, 39, 51.9920), 299.800));
        assertThat(e.xM()).isCloseTo(3790644.900, within(PUBLISHED_MM));
        assertThat(e.yM()).isCloseTo(-110149.210, within(PUBLISHED_MM));
        assertThat(e.zM()).isCloseTo(5111482.970, within(PUBLISHED_MM));
        // GRS80 and WGS-84 differ only in the 11th digit of f (about 0.1 mm here), below the example's
        // 1 mm precision: this checks the per-ellipsoid path, it cannot tell the two ellipsoids apart.
        Geodetic back = Ellipsoid.GRS80.toGeodetic(e);
        assertThat(back.altM()).isCloseTo(299.800, within(ROUND_TRIP_M));
    }

    @ParameterizedTest(name = "at {0} deg: 1 deg of latitude {1} m, of longitude {2} m")
    @CsvSource({
            // Lengths of a degree on WGS-84 (a = 6378137 m, 1/f = 298.257223563, NIMA TR8350.2 table 3.1)
            // from the meridian radius M and the prime-vertical radius N (M pi/180 and N cos(lat) pi/180),
            // computed by hand to the centimetre; they agree with the usual degree-length tables
            // (110.574 km and 111.320 km at the equator, cited from memory). Tolerance 1 cm: the last place.
            "0, 110574.28, 111319.49",
            "45, 111131.78, 78846.84",
            "60, 111412.29, 55800.00"})
    void degreeLengthsMatchTheTable(double latDeg, double latDegreeM, double lonDegreeM) {
        assertThat(Wgs84.meridianRadiusM(latDeg) * Math.PI / 180.0).isCloseTo(latDegreeM, within(0.01));
        assertThat(Wgs84.primeVerticalRadiusM(latDeg) * Math.cos(Math.toRadians(latDeg)) * Math.PI / 180.0)
                .isCloseTo(lonDegreeM, within(0.01));
    }

    @Test
    void radiiAtThePolesAndEquatorHaveTheirClosedForms() {
        // Exact identities: at the equator M = b^2/a and N = a; at the poles M = N = a^2/b.
        double a = Wgs84.SEMI_MAJOR_AXIS_M;
        double b = Wgs84.SEMI_MINOR_AXIS_M;
        assertThat(Wgs84.meridianRadiusM(0.0)).isCloseTo(b * b / a, within(1e-6));
        assertThat(Wgs84.primeVerticalRadiusM(0.0)).isCloseTo(a, within(1e-6));
        assertThat(Wgs84.meridianRadiusM(90.0)).isCloseTo(a * a / b, within(1e-6));
        assertThat(Wgs84.primeVerticalRadiusM(-90.0)).isCloseTo(a * a / b, within(1e-6));
    }

    @Test
    void agreesWithProj4jGeocentricConversionOnRandomPoints() {
        // Reference: Proj4J 1.4.1 GeocentricConverter on WGS-84 (radians, x = lon, y = lat).
        // Proj4J's inverse is itself an approximation; both directions agree with ours well under 1 mm.
        GeocentricConverter proj4j = new GeocentricConverter(org.locationtech.proj4j.datum.Ellipsoid.WGS84);
        SplittableRandom random = new SplittableRandom(20240611L);
        for (int i = 0; i < 2000; i++) {
            Geodetic g = randomPoint(random);
            ProjCoordinate c = new ProjCoordinate(Math.toRadians(g.lonDeg()), Math.toRadians(g.latDeg()), g.altM());
            proj4j.convertGeodeticToGeocentric(c);
            Ecef ours = Wgs84.toEcef(g);
            assertThat(distanceM(ours, new Ecef(c.x, c.y, c.z))).as("toEcef at %s", g).isLessThan(1e-3);

            proj4j.convertGeocentricToGeodetic(c);
            Geodetic theirs = new Geodetic(Math.toDegrees(c.y), Math.toDegrees(c.x), c.z);
            assertThat(separationM(Wgs84.toGeodetic(ours), theirs)).as("toGeodetic at %s", g).isLessThan(1e-3);
        }
    }

    @Test
    void roundTripsOnRandomPointsStayUnderATenthOfAMillimetre() {
        // Exact-by-construction check: toGeodetic must invert toEcef (Vermeille's formula is closed form).
        SplittableRandom random = new SplittableRandom(7L);
        for (int i = 0; i < 5000; i++) {
            Geodetic g = randomPoint(random);
            assertThat(separationM(Wgs84.toGeodetic(Wgs84.toEcef(g)), g)).as("round trip at %s", g)
                    .isLessThan(ROUND_TRIP_M);
        }
    }

    @ParameterizedTest(name = "lat {0} lon {1} alt {2}")
    @CsvSource({
            "90, 0, 0", "-90, 0, 0", "90, 123.4, 50000", "-90, -180, -1000",
            "89.999999999, 10, 100", "-89.9999999, -170, 20000", "89.99, 45, -1000",
            "0, 0, 0", "0, 180, -1000", "0, -180, 50000", "0, 90, 10", "1e-12, -45, 0",
            "45, 179.9999999, 500", "-33.5, -0.0000001, 0"})
    void roundTripsAtPolesNearPolesAndEquatorStayUnderATenthOfAMillimetre(double latDeg, double lonDeg, double altM) {
        Geodetic g = new Geodetic(latDeg, lonDeg, altM);
        Geodetic back = Wgs84.toGeodetic(Wgs84.toEcef(g));
        assertThat(separationM(back, g)).isLessThan(ROUND_TRIP_M);
        assertThat(back.latDeg()).isBetween(-90.0, 90.0);
        assertThat(back.lonDeg()).isBetween(-180.0, 180.0);
    }

    @Test
    void exactPolesComeBackAsExactlyNinetyDegrees() {
        // On the axis the half-angle formula gives 2 atan2(z, |z|) = +-pi/2 exactly (after clamping).
        double b = Wgs84.SEMI_MINOR_AXIS_M;
        Geodetic north = Wgs84.toGeodetic(new Ecef(0, 0, b + 12.5));
        assertThat(north.latDeg()).isEqualTo(90.0);
        assertThat(north.altM()).isCloseTo(12.5, within(1e-9));
        Geodetic south = Wgs84.toGeodetic(new Ecef(0, 0, -b - 7.0));
        assertThat(south.latDeg()).isEqualTo(-90.0);
        assertThat(south.altM()).isCloseTo(7.0, within(1e-9));
    }

    @Test
    void pointsNearTheEarthsCentreAreRejectedWithAReason() {
        assertThatThrownBy(() -> Wgs84.toGeodetic(new Ecef(1000.0, 0.0, 0.0)))
                .isInstanceOf(IllegalArgumentException.class)
                .hasMessageContaining("43 km of the centre of WGS-84");
    }

    @Test
    void ellipsoidRejectsImpossibleShapes() {
        assertThatThrownBy(() -> new Ellipsoid("x", -1.0, 0.0)).hasMessageContaining("semiMajorAxisM");
        assertThatThrownBy(() -> new Ellipsoid("x", 1.0, 1.0)).hasMessageContaining("flattening");
        assertThatThrownBy(() -> Wgs84.meridianRadiusM(91.0)).hasMessageContaining("latDeg");
    }

    /** Latitude uniform in sine (uniform over the sphere), longitude uniform, height -1 km..+50 km. */
    static Geodetic randomPoint(SplittableRandom random) {
        double latDeg = Math.toDegrees(Math.asin(random.nextDouble(-1.0, 1.0)));
        return new Geodetic(latDeg, random.nextDouble(-180.0, 180.0), random.nextDouble(-1000.0, 50000.0));
    }

    static double distanceM(Ecef p, Ecef q) {
        return Math.sqrt(Math.pow(p.xM() - q.xM(), 2) + Math.pow(p.yM() - q.yM(), 2) + Math.pow(p.zM() - q.zM(), 2));
    }

    /** Separation of two nearby geodetic points in metres, measured through ECEF. */
    static double separationM(Geodetic p, Geodetic q) {
        return distanceM(Wgs84.toEcef(p), Wgs84.toEcef(q));
    }
}
