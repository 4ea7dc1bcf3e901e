package org.wayhold.simulate;

/**
 * The truth trajectory of a {@link Route}: positions and heights at every 10 ms tick, integrated once,
 * and exact values in between.
 *
 * <p>Speed, yaw rate, yaw, grade and distance come in closed form from the piecewise-linear profiles.
 * The position is the integral of speed * cos(grade) * (cos yaw, sin yaw) and the height the integral
 * of speed * sin(grade), taken over each tick by 3-point Gauss-Legendre quadrature (exact for
 * polynomials up to degree 5; Abramowitz and Stegun, Handbook of Mathematical Functions, 25.4.29).
 * Knots lie on ticks, so the integrand is smooth inside each tick and the quadrature error over 10 ms
 * is far below a micrometre. On a flat route the grade terms are skipped, so the result is bit for bit
 * the planar integral.
 */
final class TruthTable {

    /** Gauss-Legendre abscissa on [-1, 1]: sqrt(3/5). */
    private static final double GL_X = Math.sqrt(0.6);
    private static final double GL_W_OUTER = 5.0 / 9.0;
    private static final double GL_W_MIDDLE = 8.0 / 9.0;

    private final Route route;
    private final double[] eastM;
    private final double[] northM;
    /** Height at each tick (m); null on a flat route, where it is 0 everywhere. */
    private final double[] upM;

    TruthTable(Route route) {
        this.route = route;
        int n = Math.toIntExact(route.ticks());
        eastM = new double[n + 1];
        northM = new double[n + 1];
        upM = route.level() ? null : new double[n + 1];
        double[] step = new double[3];
        for (int i = 0; i < n; i++) {
            integrate(route.segmentAt(i), i, i + 1, step);
            eastM[i + 1] = eastM[i] + step[0];
            northM[i + 1] = northM[i] + step[1];
            if (upM != null) {
                upM[i + 1] = upM[i] + step[2];
            }
        }
    }

    /** Number of ticks; valid tick positions are {@code [0, ticks()]}. */
    long ticks() {
        return eastM.length - 1;
    }

    /** East of the origin at an integer tick (m). */
    double eastM(int tick) {
        return eastM[tick];
    }

    /** North of the origin at an integer tick (m). */
    double northM(int tick) {
        return northM[tick];
    }

    /** Height above the origin at an integer tick (m). */
    double upM(int tick) {
        return upM == null ? 0.0 : upM[tick];
    }

    /**
     * The truth at a tick position.
     *
     * @param tick position in ticks since the start, within {@code [0, ticks()]}
     * @param t    the same instant in epoch seconds, copied into the result
     */
    Truth at(double tick, double t) {
        int i = (int) Math.floor(tick);
        if (i >= eastM.length - 1) {
            i = eastM.length - 2;
        }
        int k = route.segmentAt(tick);
        double e = eastM[i];
        double n = northM[i];
        double u = upM(i);
        if (tick > i) {
            double[] step = new double[3];
            integrate(route.segmentAt(i), i, tick, step);
            e += step[0];
            n += step[1];
            u += step[2];
        }
        return new Truth(t, e, n, route.yawRad(k, tick), route.speedMps(k, tick),
                route.yawRateRadPerS(k, tick), route.distanceM(k, tick), u, route.gradeRad(k, tick));
    }

    /** Displacement east, north, up from tick a to tick b, both inside segment k: Gauss-Legendre on 3 nodes. */
    private void integrate(int k, double a, double b, double[] out) {
        double mid = 0.5 * (a + b);
        double half = 0.5 * (b - a);
        double halfS = half * Route.TICK_S;
        double e = 0;
        double n = 0;
        double u = 0;
        boolean level = route.level();
        for (int j = -1; j <= 1; j++) {
            double x = mid + j * GL_X * half;
            double w = j == 0 ? GL_W_MIDDLE : GL_W_OUTER;
            double v = route.speedMps(k, x);
            double yaw = route.yawRad(k, x);
            if (level) {
                e += w * v * StrictMath.cos(yaw);
                n += w * v * StrictMath.sin(yaw);
            } else {
                double grade = route.gradeRad(k, x);
                double horizontal = v * StrictMath.cos(grade);
                e += w * horizontal * StrictMath.cos(yaw);
                n += w * horizontal * StrictMath.sin(yaw);
                u += w * v * StrictMath.sin(grade);
            }
        }
        out[0] = e * halfS;
        out[1] = n * halfS;
        out[2] = u * halfS;
    }
}
