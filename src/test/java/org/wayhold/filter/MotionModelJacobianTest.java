package org.wayhold.filter;

import static org.assertj.core.api.Assertions.assertThat;
import static org.wayhold.filter.StateIndex.EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_NORTH;
import static org.wayhold.filter.StateIndex.GYRO_BIAS;
import static org.wayhold.filter.StateIndex.GNSS_LATENCY;
import static org.wayhold.filter.StateIndex.LEVER_LEFT;
import static org.wayhold.filter.StateIndex.LEVER_FORWARD;
import static org.wayhold.filter.StateIndex.GYRO_SCALE;
import static org.wayhold.filter.StateIndex.NORTH;
import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.SPEED_SCALE;
import static org.wayhold.filter.StateIndex.YAW;

import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/**
 * The analytic Jacobians of {@link MotionModel#step} against central differences of the same function
 * at seeded random points (an exact numerical check: the difference quotient converges to the true
 * derivative, so any error in a hand-derived entry shows).
 *
 * <p>Difference step: h = 1e-5 scaled by max(1, |argument|). The central quotient's truncation error
 * is h^2 |f'''| / 6, about 2e-11 relative here (every third derivative is bounded by the entry's own
 * scale: sines and cosines of the yaw, times dist or dt); its rounding error is about
 * eps |f| / h = 2.2e-11 |f|, with |f| <= 60 m for the positions drawn below. Both sit far below the
 * 1e-6 relative tolerance (DEVELOPERS.md, "Targets the tests hold"), which a wrong entry (off by a
 * term, a factor or a sign) exceeds by orders of magnitude. The random bias is kept so that a perturbation never
 * carries |theta| across the series/closed-form switch at 1e-4 rad, where the two branches differ by
 * ~1e-12 and would swamp a quotient over 2 h dt.
 */
class MotionModelJacobianTest {

    private static final double REL_STEP = 1e-5;
    private static final double REL_TOL = 1e-6;
    /**
     * Entries smaller than this (in the unit of their row per unit of their column) are compared
     * absolutely to REL_TOL * this floor: the quotient's rounding noise (~2e-9 here) has no relative
     * meaning for an entry that is exactly or nearly zero.
     */
    private static final double ENTRY_FLOOR = 1e-2;

    private enum Kind { STRAIGHT, GENTLE, SHARP, REVERSING, STANDSTILL }

    private record Point(double[] x, double wheel, double rate, double dt, boolean standstill, double decay) {
    }

    private static Point randomPoint(SplittableRandom rnd, Kind kind) {
        double[] x = new double[SIZE];
        x[EAST] = rnd.nextDouble(-50.0, 50.0);
        x[NORTH] = rnd.nextDouble(-50.0, 50.0);
        x[YAW] = rnd.nextDouble(-Math.PI, Math.PI);
        x[GYRO_BIAS] = rnd.nextDouble(-0.01, 0.01);
        x[SPEED_SCALE] = rnd.nextDouble(0.95, 1.05);
        x[GYRO_SCALE] = rnd.nextDouble(0.97, 1.03);
        x[LEVER_FORWARD] = rnd.nextDouble(-2.0, 2.0);
        x[LEVER_LEFT] = rnd.nextDouble(-1.0, 1.0);
        x[GNSS_LATENCY] = rnd.nextDouble(-0.1, 0.3);
        x[GNSS_ERR_EAST] = rnd.nextDouble(-3.0, 3.0);
        x[GNSS_ERR_NORTH] = rnd.nextDouble(-3.0, 3.0);
        double dt = rnd.nextDouble(0.005, 0.1);
        double wheel = rnd.nextDouble(0.5, 40.0);
        double omega;
        switch (kind) {
            // |theta| <= 1e-6: well inside the Taylor branch even after a bias step of h dt <= 1e-6.
            case STRAIGHT -> omega = rnd.nextDouble(-1e-6, 1e-6) / dt;
            case GENTLE -> omega = rnd.nextDouble(-0.3, 0.3);
            // theta up to 2.5 rad: a step far longer than the filter ever takes, to test the closed form.
            case SHARP -> {
                dt = rnd.nextDouble(0.5, 2.5);
                omega = (rnd.nextBoolean() ? 1 : -1) * rnd.nextDouble(0.3, 1.0);
            }
            case REVERSING -> {
                wheel = -rnd.nextDouble(0.5, 5.0);
                omega = rnd.nextDouble(-0.5, 0.5);
            }
            default -> {
                wheel = 0.0;
                omega = rnd.nextDouble(-0.05, 0.05);
            }
        }
        if (kind != Kind.STRAIGHT && Math.abs(omega * dt) < 1e-3) {
            // Keep GENTLE/REVERSING clear of the branch switch (see the class comment).
            omega = Math.copySign(2e-3 / dt, omega);
        }
        double rate = omega / x[GYRO_SCALE] + x[GYRO_BIAS];
        double decay = Math.exp(-dt / rnd.nextDouble(10.0, 100.0));
        return new Point(x, wheel, rate, dt, kind == Kind.STANDSTILL, decay);
    }

    @Test
    void transitionAndInputJacobiansMatchCentralDifferencesAtHundredRandomPoints() {
        SplittableRandom rnd = new SplittableRandom(7_000_001L);
        Kind[] kinds = Kind.values();
        double worst = 0.0;
        for (int n = 0; n < 100; n++) {
            Kind kind = kinds[n % kinds.length];
            Point pt = randomPoint(rnd, kind);
            double[] fAnalytic = new double[SIZE * SIZE];
            double[] gAnalytic = new double[6];
            MotionModel.step(pt.x, pt.wheel, pt.rate, pt.dt, pt.standstill, pt.decay, new double[SIZE], fAnalytic,
                    gAnalytic);

            for (int j = 0; j < SIZE; j++) {
                double h = REL_STEP * Math.max(1.0, Math.abs(pt.x[j]));
                double[] xp = pt.x.clone();
                double[] xm = pt.x.clone();
                xp[j] += h;
                xm[j] -= h;
                double[] outP = new double[SIZE];
                double[] outM = new double[SIZE];
                MotionModel.step(xp, pt.wheel, pt.rate, pt.dt, pt.standstill, pt.decay, outP, null, null);
                MotionModel.step(xm, pt.wheel, pt.rate, pt.dt, pt.standstill, pt.decay, outM, null, null);
                for (int i = 0; i < SIZE; i++) {
                    double numeric = (outP[i] - outM[i]) / (xp[j] - xm[j]);
                    worst = Math.max(worst, check(fAnalytic[i * SIZE + j], numeric, kind, "F", i, j));
                }
            }
            // Inputs: column 0 wheel speed, column 1 yaw rate; rows east, north, yaw.
            for (int col = 0; col < 2; col++) {
                double base = col == 0 ? pt.wheel : pt.rate;
                double h = REL_STEP * Math.max(1.0, Math.abs(base));
                double[] outP = new double[SIZE];
                double[] outM = new double[SIZE];
                if (col == 0) {
                    MotionModel.step(pt.x, base + h, pt.rate, pt.dt, pt.standstill, pt.decay, outP, null, null);
                    MotionModel.step(pt.x, base - h, pt.rate, pt.dt, pt.standstill, pt.decay, outM, null, null);
                } else {
                    MotionModel.step(pt.x, pt.wheel, base + h, pt.dt, pt.standstill, pt.decay, outP, null, null);
                    MotionModel.step(pt.x, pt.wheel, base - h, pt.dt, pt.standstill, pt.decay, outM, null, null);
                }
                for (int i = 0; i < 3; i++) {
                    double numeric = (outP[i] - outM[i]) / (2.0 * h);
                    worst = Math.max(worst, check(gAnalytic[col * 3 + i], numeric, kind, "G", i, col));
                }
            }
        }
        // The measured worst relative error is recorded in the report; the assertion is per entry above.
        assertThat(worst).isLessThan(REL_TOL);
    }

    /** Returns the scaled error of one entry and fails when it passes the tolerance. */
    private static double check(double analytic, double numeric, Kind kind, String m, int i, int j) {
        double scale = Math.max(Math.abs(analytic), ENTRY_FLOOR);
        double err = Math.abs(analytic - numeric) / scale;
        assertThat(err).as("%s %s[%d][%d]: analytic %s, central difference %s", kind, m, i, j, analytic, numeric)
                .isLessThan(REL_TOL);
        return err;
    }

    @Test
    void standstillHoldsYawAndCutsTheBiasAndRateColumns() {
        // Exact hand case: at a standstill omega is forced to 0, so yaw' = yaw whatever the gyro reads,
        // and neither the bias nor the rate input can move anything.
        double[] x = {3.0, -4.0, 1.2, 0.003, 1.01, 1.002, 0.5, -0.5, 0.4, -0.1, 0.05};
        double[] out = new double[SIZE];
        double[] f = new double[SIZE * SIZE];
        double[] g = new double[6];
        MotionModel.step(x, 0.0, 0.05, 0.01, true, 0.999, out, f, g);
        assertThat(out[YAW]).isEqualTo(1.2);
        assertThat(out[EAST]).isEqualTo(3.0);
        assertThat(out[NORTH]).isEqualTo(-4.0);
        for (int i = 0; i < SIZE; i++) {
            assertThat(f[i * SIZE + GYRO_BIAS]).isEqualTo(i == GYRO_BIAS ? 1.0 : 0.0);
            assertThat(f[i * SIZE + GYRO_SCALE]).isEqualTo(i == GYRO_SCALE ? 1.0 : 0.0);
        }
        // -0.0 and 0.0 are the same zero here: compare magnitudes.
        assertThat(new double[] {Math.abs(g[3]), Math.abs(g[4]), Math.abs(g[5])}).containsOnly(0.0);
    }
}
