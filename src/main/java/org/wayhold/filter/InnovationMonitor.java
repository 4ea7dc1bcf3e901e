package org.wayhold.filter;

import static org.wayhold.filter.StateIndex.EAST;
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
