package org.wayhold.pose;

import org.wayhold.filter.ChiSquare;
import org.wayhold.geo.Angles;

/**
 * The 95% error ellipse of a horizontal position.
 *
 * <p>For a 2x2 covariance with eigenvalues l1 >= l2 the region holding the true position with 95%
 * probability is an ellipse with semi-axes sqrt(c l1) and sqrt(c l2), c = chi-square 2-dof 0.95
 * quantile = 5.991 (Bar-Shalom, Li, Kirubarajan, <i>Estimation with Applications to Tracking and
 * Navigation</i>, sec. 1.4.16 on probability regions of Gaussians).
 *
 * @param semiMajorM     semi-major axis (m)
 * @param semiMinorM     semi-minor axis (m)
 * @param orientationDeg direction of the major axis, degrees clockwise from true north, [0, 180)
 */
public record Ellipse95(double semiMajorM, double semiMinorM, double orientationDeg) {

    /** Chi-square quantile for 95% with 2 degrees of freedom. */
    public static final double SCALE_2DOF_95 = ChiSquare.quantile2Dof(0.95);

    /** The ellipse of a position not known yet: every field NaN (null in JSON). */
    public static final Ellipse95 UNKNOWN = new Ellipse95(Double.NaN, Double.NaN, Double.NaN);

    public Ellipse95 {
        boolean unknown = Double.isNaN(semiMajorM) && Double.isNaN(semiMinorM) && Double.isNaN(orientationDeg);
        if (!unknown && !(semiMajorM >= semiMinorM && semiMinorM >= 0.0)) {
            throw new IllegalArgumentException("semi axes: need semi_major >= semi_minor >= 0 m, were "
                    + semiMajorM + " and " + semiMinorM);
        }
    }

    /**
     * The ellipse of a horizontal covariance in ENU.
     *
     * @param covEastEastM2   variance of east (m^2)
     * @param covEastNorthM2  covariance of east and north (m^2)
     * @param covNorthNorthM2 variance of north (m^2)
     * @return the ellipse, {@link #UNKNOWN} when the covariance is not finite
     */
    public static Ellipse95 of(double covEastEastM2, double covEastNorthM2, double covNorthNorthM2) {
        if (!(Double.isFinite(covEastEastM2) && Double.isFinite(covEastNorthM2) && Double.isFinite(covNorthNorthM2))) {
            return UNKNOWN;
        }
        double mean = 0.5 * (covEastEastM2 + covNorthNorthM2);
        double half = 0.5 * (covEastEastM2 - covNorthNorthM2);
        double root = Math.hypot(half, covEastNorthM2);
        double l1 = Math.max(mean + root, 0.0);
        double l2 = Math.max(mean - root, 0.0);
        // Major axis angle counter-clockwise from east; 0.5 atan2(2 b, a - c) for [[a, b], [b, c]].
        double angleFromEastRad = 0.5 * Math.atan2(2.0 * covEastNorthM2, covEastEastM2 - covNorthNorthM2);
        double orientation = Angles.wrapDeg180(90.0 - Math.toDegrees(angleFromEastRad));
        return new Ellipse95(Math.sqrt(SCALE_2DOF_95 * l1), Math.sqrt(SCALE_2DOF_95 * l2), orientation);
    }
}
