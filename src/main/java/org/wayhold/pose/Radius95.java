package org.wayhold.pose;

/**
 * The radius of the circle, centred on the estimate, that holds the true horizontal position with 95%
 * probability, for a Gaussian error of covariance [[ee, en], [en, nn]]: the horizontal 95% radius
 * (R95) of the navigation trade, not the ellipse's semi-major axis.
 *
 * <p>With eigenvalues l1 >= l2 of the covariance and k = l2 / l1, the radius is sqrt(l1) g(k), where
 * g solves P(Z1^2 + k Z2^2 <= g^2) = 0.95 for independent standard normal Z1, Z2. It lies between
 * 1.95996 (k = 0: the two-sided 95% quantile of one normal) and 2.44775 (k = 1: sqrt(-2 ln 0.05), the
 * circular case; NIST/SEMATECH e-Handbook 1.3.6.7.1 and the Rayleigh distribution). The probability
 * is written as one smooth integral over the first axis,
 * <pre>
 *   P(r) = 2 integral_0^{pi/2} phi(u sin t) (2 Phi(r cos t / sqrt(l2)) - 1) u cos t dt,  u = r / sqrt(l1)
 * </pre>
 * (substituting z1 = u sin t removes the square-root end point), evaluated by Simpson's rule; g is
 * found by bisection once per entry of a table over sqrt(k) at class load, and read by cubic
 * interpolation: about 1e-6 relative.
 */
public final class Radius95 {

    /** Table nodes over s = sqrt(k) in [0, 1]. */
    private static final int NODES = 257;
    private static final double[] TABLE = table();

    private Radius95() {
    }

    /**
     * The 95% horizontal radius of a covariance (m); NaN when the covariance is not known.
     *
     * @param ee variance of east (m^2)
     * @param en covariance of east and north (m^2)
     * @param nn variance of north (m^2)
     */
    public static double of(double ee, double en, double nn) {
        if (!(Double.isFinite(ee) && Double.isFinite(en) && Double.isFinite(nn))) {
            return Double.NaN;
        }
        double mean = 0.5 * (ee + nn);
        double root = Math.hypot(0.5 * (ee - nn), en);
        double l1 = Math.max(mean + root, 0.0);
        double l2 = Math.max(mean - root, 0.0);
        if (l1 == 0.0) {
            return 0.0;
        }
        return Math.sqrt(l1) * factor(Math.sqrt(l2 / l1));
    }

    /** g(k) at s = sqrt(k), by cubic (Catmull-Rom) interpolation in the table. */
    static double factor(double s) {
        double pos = Math.min(Math.max(s, 0.0), 1.0) * (NODES - 1);
        int i = Math.min((int) pos, NODES - 2);
        double f = pos - i;
        double y0 = TABLE[Math.max(i - 1, 0)];
        double y1 = TABLE[i];
        double y2 = TABLE[i + 1];
        double y3 = TABLE[Math.min(i + 2, NODES - 1)];
        return y1 + 0.5 * f * (y2 - y0 + f * (2.0 * y0 - 5.0 * y1 + 4.0 * y2 - y3 + f * (3.0 * (y1 - y2) + y3 - y0)));
    }

    private static double[] table() {
        double[] t = new double[NODES];
        for (int i = 0; i < NODES; i++) {
            double s = (double) i / (NODES - 1);
            t[i] = solve(s * s);
        }
        return t;
    }

    /** g(k) by bisection on the probability (unit major variance). */
    static double solve(double k) {
        double lo = 1.959;
        double hi = 2.448;
        for (int it = 0; it < 44; it++) {
            double mid = 0.5 * (lo + hi);
            if (probabilityWithin(mid, k) < 0.95) {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        return 0.5 * (lo + hi);
    }

    /** P(Z1^2 + k Z2^2 <= r^2) for standard normal Z1, Z2 (the integral above with l1 = 1, l2 = k). */
    static double probabilityWithin(double r, double k) {
        int n = 200;
        double h = 0.5 * Math.PI / n;
        double sum = 0.0;
        for (int i = 0; i <= n; i++) {
            double t = i * h;
            double w = i == 0 || i == n ? 1.0 : (i % 2 == 1 ? 4.0 : 2.0);
            double z = r * Math.sin(t);
            double inner = k == 0.0 ? (Math.cos(t) > 0.0 ? 1.0 : 0.0)
                    : 2.0 * normalCdf(r * Math.cos(t) / Math.sqrt(k)) - 1.0;
            sum += w * Math.exp(-0.5 * z * z) / Math.sqrt(2.0 * Math.PI) * inner * r * Math.cos(t);
        }
        return 2.0 * sum * h / 3.0;
    }

    /**
     * The standard normal distribution function, from the Chebyshev fit of the complementary error
     * function in Numerical Recipes in C (2nd ed., sec. 6.2, {@code erfcc}, fractional error below
     * 1.2e-7; coefficients from that book, quoted from memory and checked in the tests against Commons
     * Math's {@code Erf}).
     */
    static double normalCdf(double x) {
        return 0.5 * erfc(-x / Math.sqrt(2.0));
    }

    private static double erfc(double x) {
        double z = Math.abs(x);
        double t = 1.0 / (1.0 + 0.5 * z);
        double ans = t * Math.exp(-z * z - 1.26551223 + t * (1.00002368 + t * (0.37409196 + t * (0.09678418
                + t * (-0.18628806 + t * (0.27886807 + t * (-1.13520398 + t * (1.48851587
                + t * (-0.82215223 + t * 0.17087277)))))))));
        return x >= 0.0 ? ans : 2.0 - ans;
    }
}
