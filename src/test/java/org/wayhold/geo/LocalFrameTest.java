package org.wayhold.geo;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;
import static org.assertj.core.api.Assertions.within;
import static org.wayhold.geo.Wgs84Test.dms;
import static org.wayhold.geo.Wgs84Test.separationM;

import java.util.SplittableRandom;
import java.util.stream.Stream;
import net.sf.geographiclib.Geodesic;
import net.sf.geographiclib.GeodesicData;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.junit.jupiter.params.provider.MethodSource;

class LocalFrameTest {

    /** The IOGP examples are printed to 1 mm. */
    private static final double PUBLISHED_MM = 0.001;

    // IOGP Publication 373-7-2, EPSG methods 9836 and 9837 example: topocentric origin 55°N, 5°E,
    // h0 = 200 m (WGS 84); the point is the one of the method 9602 example.
    private static final LocalFrame IOGP_FRAME = new LocalFrame(new Geodetic(55.0, 5.0, 200.0));
    private static final Geodetic IOGP_POINT = new Geodetic(dms(53, 48, 33.820), dms(2, 7, 46.380), 73.0);

    @Test
    void originInEcefMatchesTheIogpExample() {
        // IOGP 373-7-2, EPSG 9836 example: origin X0 3652755.3058, Y0 319574.6799, Z0 5201547.3536 m.
        Ecef o = IOGP_FRAME.originEcef();
        assertThat(o.xM()).isCloseTo(3652755.3058, within(PUBLISHED_MM));
        assertThat(o.yM()).isCloseTo(319574.6799, within(PUBLISHED_MM));
        assertThat(o.zM()).isCloseTo(5201547.3536, within(PUBLISHED_MM));
    }

    @Test
    void rotatedEcefDifferenceMatchesTheIogpExampleForMethod9836() {
        // IOGP 373-7-2, EPSG 9836: E -189013.869, N -128642.040, U -4220.171 m.
        assertMatchesIogp(IOGP_FRAME.toEnu(IOGP_POINT));
        assertMatchesIogp(IOGP_FRAME.toEnu(IOGP_POINT.latDeg(), IOGP_POINT.lonDeg(), IOGP_POINT.altM()));
    }

    @Test
    void closedFormMatchesTheIogpExampleForMethod9837() {
        // IOGP 373-7-2, EPSG 9837: the same E, N, U from the geographic/topocentric formulas.
        assertMatchesIogp(IOGP_FRAME.toEnuClosedForm(IOGP_POINT));
    }

    @Test
    void inverseRecoversTheIogpPoint() {
        // IOGP 373-7-2, EPSG 9836 reverse example; the published ENU is rounded to 1 mm.
        Geodetic g = IOGP_FRAME.toGeodetic(new Enu(-189013.869, -128642.040, -4220.171));
        assertThat(separationM(g, IOGP_POINT)).isLessThan(PUBLISHED_MM);
    }

    private static void assertMatchesIogp(Enu enu) {
        assertThat(enu.eastM()).isCloseTo(-189013.869, within(PUBLISHED_MM));
        assertThat(enu.northM()).isCloseTo(-128642.040, within(PUBLISHED_MM));
        assertThat(enu.upM()).isCloseTo(-4220.171, within(PUBLISHED_MM));
    }

    static Stream<Geodetic> origins() {
        return Stream.of(new Geodetic(55.0, 5.0, 200.0), new Geodetic(0.0, 0.0, 0.0),
                new Geodetic(-33.9, 151.2, 40.0), new Geodetic(89.9, -60.0, 2800.0),
                new Geodetic(64.1, 179.95, -20.0), new Geodetic(-77.8, -179.99, 3000.0));
    }

    @ParameterizedTest
    @MethodSource("origins")
    void bothFormulationsAgreeNearTheOriginAndFarther(Geodetic origin) {
        // Two algebraically equivalent routes (EPSG 9836 and 9837), so any difference is rounding.
        // ECEF coordinates near 6.4e6 m carry about 1e-9 m of rounding each, and both routes form
        // differences or products of such numbers: measured over these origins, the two agree to
        // 3.1e-9 m both within 1 km and within 50 km. Tolerance 1e-8 m, about three times that.
        LocalFrame frame = new LocalFrame(origin);
        SplittableRandom random = new SplittableRandom(origin.hashCode());
        double toleranceM = 1e-8;
        for (double radiusM : new double[] {1000.0, 50000.0}) {
            for (int i = 0; i < 500; i++) {
                Geodetic p = frame.toGeodetic(randomOffset(random, radiusM));
                Enu a = frame.toEnu(p);
                Enu b = frame.toEnuClosedForm(p);
                assertThat(Math.abs(a.eastM() - b.eastM())).as("east at %s", p).isLessThan(toleranceM);
                assertThat(Math.abs(a.northM() - b.northM())).as("north at %s", p).isLessThan(toleranceM);
                assertThat(Math.abs(a.upM() - b.upM())).as("up at %s", p).isLessThan(toleranceM);
            }
        }
    }

    @ParameterizedTest
    @MethodSource("origins")
    void roundTripsOverFiftyKilometresStayUnderATenthOfAMillimetre(Geodetic origin) {
        LocalFrame frame = new LocalFrame(origin);
        SplittableRandom random = new SplittableRandom(origin.hashCode() * 31L);
        for (int i = 0; i < 1000; i++) {
            Enu enu = randomOffset(random, 50000.0);
            Geodetic g = frame.toGeodetic(enu);
            Enu back = frame.toEnu(g);
            assertThat(Math.abs(back.eastM() - enu.eastM())).as("east of %s", enu).isLessThan(1e-4);
            assertThat(Math.abs(back.northM() - enu.northM())).as("north of %s", enu).isLessThan(1e-4);
            assertThat(Math.abs(back.upM() - enu.upM())).as("up of %s", enu).isLessThan(1e-4);
            assertThat(separationM(frame.toGeodetic(frame.toEnu(g)), g)).isLessThan(1e-4);
        }
    }

    @ParameterizedTest(name = "{0} m at azimuth {1} deg: ENU horizontal distance within {2} m")
    @CsvSource({
            // Tolerances from the flat-plane approximation, observed with GeographicLib-Java 2.0 (the oracle
            // below): ENU distance and geodesic differ by about 4 µm at 1 km and 4 mm at 10 km.
            "1000, 0, 1e-4", "1000, 137, 1e-4", "10000, 0, 0.01", "10000, 45, 0.01",
            "10000, 90, 0.01", "10000, 200, 0.01", "10000, 315, 0.01"})
    void tangentPlaneDistanceFollowsTheGeodesic(double distanceM, double azimuthDeg, double toleranceM) {
        // Reference: GeographicLib-Java 2.0, Geodesic.WGS84.Direct builds the far point exactly on the
        // ellipsoid (h = 0), Inverse gives the geodesic length and azimuth back.
        Geodetic origin = new Geodetic(48.1173, 11.5167, 0.0);
        LocalFrame frame = new LocalFrame(origin);
        GeodesicData d = Geodesic.WGS84.Direct(origin.latDeg(), origin.lonDeg(), azimuthDeg, distanceM);
        Enu enu = frame.toEnu(new Geodetic(d.lat2, d.lon2, 0.0));
        double geodesicM = Geodesic.WGS84.Inverse(origin.latDeg(), origin.lonDeg(), d.lat2, d.lon2).s12;
        assertThat(enu.horizontalM()).isCloseTo(geodesicM, within(toleranceM));
        // Direction: east = sin(azimuth), north = cos(azimuth), so the frame's axes are not swapped.
        // A normal section and a geodesic leave the origin in directions that differ by far less than
        // 1e-5 deg over 10 km; the tolerance guards against axis mistakes, not against geodesy.
        double enuAzimuthDeg = Angles.wrapDeg360(Math.toDegrees(Math.atan2(enu.eastM(), enu.northM())));
        assertThat(Angles.wrapDeg180(enuAzimuthDeg - azimuthDeg + 90.0) - 90.0).isCloseTo(0.0, within(1e-5));
        // Up: the far point on the ellipsoid lies below the tangent plane by about s^2 / (2 R).
        double expectedDropM = distanceM * distanceM / (2.0 * 6.371e6);
        assertThat(-enu.upM()).isCloseTo(expectedDropM, within(0.01 * expectedDropM));
    }

    @Test
    void originMapsToZero() {
        // Exact hand case: the origin is (0, 0, 0) in its own frame.
        Enu enu = IOGP_FRAME.toEnu(IOGP_FRAME.origin());
        assertThat(enu.eastM()).isCloseTo(0.0, within(1e-9));
        assertThat(enu.northM()).isCloseTo(0.0, within(1e-9));
        assertThat(enu.upM()).isCloseTo(0.0, within(1e-9));
    }

    @Test
    void invalidCoordinatesAreRejectedWithTheFieldName() {
        assertThatThrownBy(() -> IOGP_FRAME.toEnu(91.0, 0.0, 0.0)).hasMessageContaining("latDeg");
        assertThatThrownBy(() -> IOGP_FRAME.toEnu(0.0, 180.5, 0.0)).hasMessageContaining("lonDeg");
        assertThatThrownBy(() -> IOGP_FRAME.toEnu(0.0, 0.0, Double.NaN)).hasMessageContaining("altM");
        assertThatThrownBy(() -> IOGP_FRAME.toGeodetic(Double.NaN, 0.0, 0.0)).hasMessageContaining("eastM");
    }

    /** Uniform over a disc of the given radius, up between -1 km and +5 km. */
    private static Enu randomOffset(SplittableRandom random, double radiusM) {
        double r = radiusM * Math.sqrt(random.nextDouble());
        double angle = random.nextDouble(0.0, 2.0 * Math.PI);
        return new Enu(r * Math.cos(angle), r * Math.sin(angle), random.nextDouble(-1000.0, 5000.0));
    }
}
