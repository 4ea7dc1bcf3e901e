package org.wayhold.geo;

/**
 * Angle wrapping and the one conversion between the filter's yaw and the heading shown at the
 * edges. Yaw is radians counter-clockwise from east (the ENU x axis); heading is degrees clockwise
 * from true north. So heading = 90 deg - yaw, and a yaw rate and a heading rate have opposite
 * signs.
 *
 * <p>Worked example: a car driving north has yaw = pi/2 and heading 0 deg. A positive yaw rate
 * (counter-clockwise seen from above) turns that north-bound car towards the west, so its heading
 * decreases: after a quarter turn it drives west, yaw = pi, heading 270 deg.
 *
 * <p>Every method rejects NaN and infinities (a non-finite angle is a bug upstream, and wrapping
 * would hide it) with an {@link IllegalArgumentException} naming the argument and its unit.
 */
public final class Angles {

    private static final double TWO_PI = 2.0 * Math.PI;

    private Angles() {
    }

    /**
     * @param rad an angle (radians, finite)
     * @return the same direction in [-pi, pi) (radians)
     */
    public static double wrapPi(double rad) {
        if (rad >= -Math.PI && rad < Math.PI) {
            // Already in range: returned as is, because the shift by pi below costs an ulp of pi.
            return rad;
        }
        return wrap(rad + Math.PI, TWO_PI, "rad", "rad") - Math.PI;
    }

    /**
     * @param rad an angle (radians, finite)
     * @return the same direction in [0, 2 pi) (radians)
     */
    public static double wrapTwoPi(double rad) {
        return wrap(rad, TWO_PI, "rad", "rad");
    }

    /**
     * @param deg an angle (degrees, finite)
     * @return the same direction in [0, 360) (degrees)
     */
    public static double wrapDeg360(double deg) {
        return wrap(deg, 360.0, "deg", "degrees");
    }

    /**
     * Folds an axis direction, for which deg and deg + 180 are the same line (the major axis of an
     * error ellipse, for example).
     *
     * @param deg an axis direction (degrees, finite)
     * @return the same axis in [0, 180) (degrees)
     */
    public static double wrapDeg180(double deg) {
        return wrap(deg, 180.0, "deg", "degrees");
    }

    /**
     * @param yawRad yaw (radians counter-clockwise from east, finite)
     * @return heading (degrees clockwise from true north, [0, 360))
     */
    public static double yawRadToHeadingDeg(double yawRad) {
        requireFinite(yawRad, "yawRad", "rad");
        // Subtract in radians first so that yaw = pi/2 gives exactly 0 deg rather than 360 - 1e-14.
        return wrapDeg360(Math.toDegrees(Math.PI / 2.0 - yawRad));
    }

    /**
     * @param headingDeg heading (degrees clockwise from true north, finite, any range)
     * @return yaw (radians counter-clockwise from east, [-pi, pi))
     */
    public static double headingDegToYawRad(double headingDeg) {
        requireFinite(headingDeg, "headingDeg", "degrees");
        return wrapPi(Math.toRadians(90.0 - headingDeg));
    }

    /**
     * @param yawRateRadPerS yaw rate (radians per second, counter-clockwise positive, finite)
     * @return heading rate (degrees per second, clockwise positive): the sign is flipped
     */
    public static double yawRateToHeadingRateDegPerS(double yawRateRadPerS) {
        requireFinite(yawRateRadPerS, "yawRateRadPerS", "rad/s");
        return -Math.toDegrees(yawRateRadPerS);
    }

    /** x reduced to [0, period). */
    private static double wrap(double x, double period, String name, String unit) {
        requireFinite(x, name, unit);
        double r = x % period;
        if (r < 0.0) {
            r += period;
        }
        // A tiny negative remainder plus the period can round up to the period itself; + 0.0 turns -0.0 into 0.0.
        return r >= period ? 0.0 : r + 0.0;
    }

    private static void requireFinite(double value, String name, String unit) {
        if (!Double.isFinite(value)) {
            throw new IllegalArgumentException(name + ": must be a finite angle in " + unit + ", was " + value);
        }
    }
}
