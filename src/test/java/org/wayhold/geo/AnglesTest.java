package org.wayhold.geo;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;
import static org.assertj.core.api.Assertions.within;

import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

class AnglesTest {

    /** A few ulps of angles near 2 pi or 360 deg: the conversions multiply by pi/180 once. */
    private static final double RAD_TOL = 1e-15;
    private static final double DEG_TOL = 1e-12;

    @Test
    void drivingNorthIsYawHalfPiAndHeadingZero() {
        // Worked example of the project's conventions (package-info): driving north, yaw = pi/2 and
        // heading 0 deg.
        assertThat(Angles.yawRadToHeadingDeg(Math.PI / 2.0)).isEqualTo(0.0);
        assertThat(Angles.headingDegToYawRad(0.0)).isCloseTo(Math.PI / 2.0, within(RAD_TOL));
    }

    @Test
    void positiveYawRateTurnsANorthBoundCarWestSoHeadingDecreases() {
        // Same worked example: a positive (counter-clockwise) yaw rate turns a north-bound car west.
        double yawRateRadPerS = 0.1;
        double headingRateDegPerS = Angles.yawRateToHeadingRateDegPerS(yawRateRadPerS);
        assertThat(headingRateDegPerS).isCloseTo(-0.1 * 180.0 / Math.PI, within(DEG_TOL));
        // One second later the yaw has grown by 0.1 rad: the heading is just below 360, i.e. west of north.
        double headingAfterDeg = Angles.yawRadToHeadingDeg(Math.PI / 2.0 + yawRateRadPerS * 1.0);
        assertThat(headingAfterDeg).isCloseTo(360.0 + headingRateDegPerS, within(DEG_TOL));
        // A quarter turn later the car drives west: yaw pi, heading 270 deg.
        assertThat(Angles.yawRadToHeadingDeg(Math.PI)).isCloseTo(270.0, within(DEG_TOL));
    }

    @ParameterizedTest(name = "yaw {0} rad <-> heading {1} deg")
    @CsvSource({
            // Exact hand cases of heading = 90 deg - yaw: east, north, west, south.
            "0.0, 90.0", "1.5707963267948966, 0.0", "3.141592653589793, 270.0", "-1.5707963267948966, 180.0",
            "-0.7853981633974483, 135.0", "2.356194490192345, 315.0"})
    void cardinalAndDiagonalDirectionsConvertBothWays(double yawRad, double headingDeg) {
        assertThat(Angles.yawRadToHeadingDeg(yawRad)).isCloseTo(headingDeg, within(DEG_TOL));
        assertThat(Angles.headingDegToYawRad(headingDeg)).isCloseTo(Angles.wrapPi(yawRad), within(RAD_TOL));
    }

    @ParameterizedTest(name = "heading {0} deg -> yaw {1} rad")
    @CsvSource({
            // Wrap cases at 0/360: 360 is north again, -90 is west, 720.5 is 0.5 deg east of north.
            "360.0, 1.5707963267948966", "-90.0, -3.141592653589793", "720.5, 1.5620696805349251",
            // Heading 270 (west) is yaw pi, which [-pi, pi) writes as -pi.
            "270.0, -3.141592653589793"})
    void headingsOutsideTheUsualRangeWrap(double headingDeg, double yawRad) {
        assertThat(Angles.headingDegToYawRad(headingDeg)).isCloseTo(yawRad, within(1e-14));
    }

    @Test
    void headingsEitherSideOfWestLandAtOppositeEndsOfTheYawRange() {
        // Exact hand case around the +-pi seam: 1e-6 deg = 1.7453292519943295e-8 rad.
        double microDegRad = Math.toRadians(1e-6);
        // 270.000001 deg is just north of west: yaw -180.000001 deg wraps to just below +pi.
        assertThat(Angles.headingDegToYawRad(270.000001)).isCloseTo(Math.PI - microDegRad, within(1e-14));
        // 269.999999 deg is just south of west: yaw -179.999999 deg, just above -pi.
        assertThat(Angles.headingDegToYawRad(269.999999)).isCloseTo(-Math.PI + microDegRad, within(1e-14));
    }

    @Test
    void wrapPiIsHalfOpenAtPlusAndMinusPi() {
        // [-pi, pi): +pi maps to -pi, -pi stays, and values just inside stay put.
        assertThat(Angles.wrapPi(Math.PI)).isEqualTo(-Math.PI);
        assertThat(Angles.wrapPi(-Math.PI)).isEqualTo(-Math.PI);
        assertThat(Angles.wrapPi(Math.nextDown(Math.PI))).isEqualTo(Math.nextDown(Math.PI));
        assertThat(Angles.wrapPi(3.0 * Math.PI)).isCloseTo(-Math.PI, within(RAD_TOL));
        assertThat(Angles.wrapPi(-3.5 * Math.PI)).isCloseTo(0.5 * Math.PI, within(RAD_TOL));
        assertThat(Angles.wrapPi(0.1)).isEqualTo(0.1);
    }

    @Test
    void wrapsAreHalfOpenAtTheirUpperEnd() {
        assertThat(Angles.wrapTwoPi(2.0 * Math.PI)).isEqualTo(0.0);
        assertThat(Angles.wrapTwoPi(-0.5 * Math.PI)).isCloseTo(1.5 * Math.PI, within(RAD_TOL));
        assertThat(Angles.wrapDeg360(360.0)).isEqualTo(0.0);
        assertThat(Angles.wrapDeg360(-0.0)).isEqualTo(0.0);
        assertThat(Angles.wrapDeg360(-1.0)).isEqualTo(359.0);
        assertThat(Angles.wrapDeg360(725.0)).isEqualTo(5.0);
        // A remainder of -1e-20 plus 360 rounds to 360 itself; it must come back as 0.
        assertThat(Angles.wrapDeg360(-1e-20)).isEqualTo(0.0);
        // Ellipse axes: 180 is the same axis as 0, -30 the same as 150.
        assertThat(Angles.wrapDeg180(180.0)).isEqualTo(0.0);
        assertThat(Angles.wrapDeg180(-30.0)).isEqualTo(150.0);
        assertThat(Angles.wrapDeg180(190.0)).isEqualTo(10.0);
    }

    @Test
    void wrappedValuesStayInRangeAndPointTheSameWay() {
        // Seeded property check: each result is in its half-open range and differs from the input by
        // a whole number of turns (to the rounding of the remainder, a few ulps of the input).
        SplittableRandom random = new SplittableRandom(42L);
        for (int i = 0; i < 10000; i++) {
            double rad = random.nextDouble(-100.0, 100.0);
            double pi = Angles.wrapPi(rad);
            double twoPi = Angles.wrapTwoPi(rad);
            assertThat(pi).isGreaterThanOrEqualTo(-Math.PI).isLessThan(Math.PI);
            assertThat(twoPi).isGreaterThanOrEqualTo(0.0).isLessThan(2.0 * Math.PI);
            assertThat(Math.sin(pi)).isCloseTo(Math.sin(rad), within(1e-13));
            assertThat(Math.cos(twoPi)).isCloseTo(Math.cos(rad), within(1e-13));
            double deg = random.nextDouble(-5000.0, 5000.0);
            double h = Angles.wrapDeg360(deg);
            assertThat(h).isGreaterThanOrEqualTo(0.0).isLessThan(360.0);
            assertThat(Math.rint((deg - h) / 360.0) * 360.0).isCloseTo(deg - h, within(1e-10));
            assertThat(Angles.yawRadToHeadingDeg(Angles.headingDegToYawRad(h))).isCloseTo(h, within(1e-10));
        }
    }

    @Test
    void nonFiniteAnglesAreRejectedWithTheArgumentName() {
        assertThatThrownBy(() -> Angles.wrapPi(Double.NaN)).isInstanceOf(IllegalArgumentException.class)
                .hasMessageContaining("rad");
        assertThatThrownBy(() -> Angles.wrapDeg360(Double.POSITIVE_INFINITY)).hasMessageContaining("deg");
        assertThatThrownBy(() -> Angles.yawRadToHeadingDeg(Double.NaN)).hasMessageContaining("yawRad");
        assertThatThrownBy(() -> Angles.headingDegToYawRad(Double.NaN)).hasMessageContaining("headingDeg");
        assertThatThrownBy(() -> Angles.yawRateToHeadingRateDegPerS(Double.NaN))
                .hasMessageContaining("yawRateRadPerS");
    }
}
