package org.wayhold.filter;

import static org.wayhold.filter.StateIndex.EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_NORTH;
import static org.wayhold.filter.StateIndex.NORTH;
import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.YAW;

import org.wayhold.filter.FilterState.Slot;

/**
 * Watches the normalised innovations of the fixes the filter uses. Each is chi-square with two degrees
 * of freedom if the covariance is honest, so the sum of the last {@link FilterState#NIS_WINDOW} is
 * chi-square with twenty; a sum above its 0.999 quantile means the fixes have kept disagreeing with
 * the covariance (a heading glitch, an unmodelled sensor error) for longer than chance allows. The
 * covariance of position and yaw is then widened by the ratio of the observed sum to its expectation,
 * so the next fixes pull the estimate and the heading back within seconds instead of the filter
 * trusting itself for minutes.
 */
final class InnovationMonitor {

    /**
     * Chi-square quantile at 0.999 with 20 degrees of freedom (NIST/SEMATECH e-Handbook 1.3.6.7.4,
     * table of upper critical values: 45.315).
     */
    static final double WINDOW_GATE = 45.315;

    private InnovationMonitor() {
    }

    /** Records the NIS of a used fix; widens the covariance when the window says so. */
    static void record(FilterState s, double nis) {
        int next = s.whole(Slot.NIS_NEXT);
        s.recentNis[next] = nis;
        s.set(Slot.NIS_NEXT, (next + 1) % FilterState.NIS_WINDOW);
        int count = Math.min(s.whole(Slot.NIS_COUNT) + 1, FilterState.NIS_WINDOW);
        s.set(Slot.NIS_COUNT, count);
        if (count < FilterState.NIS_WINDOW) {
            return;
        }
        double sum = 0.0;
        for (double v : s.recentNis) {
            sum += v;
        }
        if (sum > WINDOW_GATE) {
            widen(s, sum / (2.0 * FilterState.NIS_WINDOW));
            s.set(Slot.NIS_COUNT, 0);
        }
    }

    /**
     * 2-dof chi-square quantile at 0.999: -2 ln(0.001) (NIST/SEMATECH e-Handbook 1.3.6.7.4: 13.816).
     */
    static final double GNSS_ERROR_GATE = 13.815510557964274;

    /**
     * Checks the correlated GNSS error the state holds against its own steady-state variance. An
     * estimate far beyond it (the 2-dof quantile at 0.999) is no receiver error: the fixes have kept
     * disagreeing with a position that drifted, and the update has parked the difference where it
     * costs least. The position's covariance then takes that estimate as a possible offset (its outer
     * product, rank one), so the next fixes move the position instead; the estimate itself decays with
     * the Gauss-Markov correlation time.
     */
    static void checkGnssError(FilterState s) {
        double ge = s.x[GNSS_ERR_EAST];
        double gn = s.x[GNSS_ERR_NORTH];
        double var = s.get(Slot.CORRELATED_VAR_M2);
        if (!(var > 0.0) || (ge * ge + gn * gn) / var <= GNSS_ERROR_GATE) {
            return;
        }
        double[] p = s.p;
        p[EAST * SIZE + EAST] += ge * ge;
        p[EAST * SIZE + NORTH] += ge * gn;
        p[NORTH * SIZE + EAST] += ge * gn;
        p[NORTH * SIZE + NORTH] += gn * gn;
        s.increment(FilterCounter.COVARIANCE_WIDENINGS);
        s.set(Slot.WIDENED_T_REL, s.get(Slot.T_REL));
    }

    /** Forgets the window (after a reacquisition or a reset, whose fixes are judged on their own). */
    static void clear(FilterState s) {
        s.set(Slot.NIS_COUNT, 0);
    }

    /**
     * Scales the rows and columns of east, north and yaw by sqrt(factor): P' = D P D with D diagonal,
     * a congruence, so P stays symmetric and positive semi-definite.
     */
    static void widen(FilterState s, double factor) {
        double g = Math.sqrt(factor);
        double[] p = s.p;
        int[] widened = {EAST, NORTH, YAW};
        for (int i : widened) {
            for (int j = 0; j < SIZE; j++) {
                p[i * SIZE + j] *= g;
                p[j * SIZE + i] *= g;
            }
        }
        s.increment(FilterCounter.COVARIANCE_WIDENINGS);
        s.set(Slot.WIDENED_T_REL, s.get(Slot.T_REL));
    }
}
