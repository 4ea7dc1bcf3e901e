package org.wayhold.calibration;

import java.util.Arrays;
import java.util.List;
import org.wayhold.sample.Sample;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;

/**
 * The white noise of one wheel-speed or yaw-rate reading, taken from the readings themselves by the
 * variate difference method (Tintner, <i>The Variate Difference Method</i>, 1940): for readings
 * y = s(t) + e of a smooth signal s sampled evenly and white noise e of variance sigma^2, the second
 * difference y[i+1] - 2 y[i] + y[i-1] has variance 6 sigma^2 plus the signal's part, which is of order
 * s'' dt^2 and negligible at tens of hertz. The scale of the second differences is taken robustly, as
 * 1.4826 times their median absolute value (the normal-consistent median absolute deviation; Hampel,
 * JASA 69, 1974), so the occasional real jolt (a gear change, the start of a turn) does not count as
 * noise.
 *
 * <p>Why not by likelihood: the filter uses these readings as inputs, and their white noise reaches the
 * position only through its integral between fixes (0.05 m/s at 50 Hz adds about 1e-5 m^2 to a 1 m^2
 * innovation variance at 5 Hz fixes). The innovation likelihood is flat in them; the readings are not.
 */
public final class ReadingNoise {

    /** Normal consistency constant of the median absolute deviation. */
    private static final double MAD_TO_SIGMA = 1.4826;
    /** Readings whose neighbours are spaced unevenly by more than this share are left out. */
    private static final double EVEN_SPACING = 0.1;
    /** Triples needed for an estimate (count). */
    static final int MIN_TRIPLES = 100;
    /** Wheel readings below this are left out (m/s): a wheel at rest reads exactly zero, without noise. */
    private static final double MOVING_MPS = 0.5;

    private ReadingNoise() {
    }

    /** 1-sigma noise of one wheel-speed reading (m/s), NaN when too few readings while moving. */
    public static double wheelSpeedMps(List<CalibrationDrive> drives) {
        return estimate(drives, true);
    }

    /** 1-sigma noise of one yaw-rate reading (rad/s), NaN when too few readings. */
    public static double yawRateRadPerS(List<CalibrationDrive> drives) {
        return estimate(drives, false);
    }

    private static double estimate(List<CalibrationDrive> drives, boolean wheel) {
        double[] d = new double[1024];
        int n = 0;
        for (CalibrationDrive drive : drives) {
            double t0 = Double.NaN;
            double t1 = Double.NaN;
            double y0 = Double.NaN;
            double y1 = Double.NaN;
            for (Sample s : drive.samples()) {
                double y;
                if (wheel && s instanceof WheelSpeed w) {
                    y = w.speedMps();
                } else if (!wheel && s instanceof YawRate r) {
                    y = r.yawRateRadPerS();
                } else {
                    continue;
                }
                double t = s.t();
                if (!Double.isNaN(t0)) {
                    double a = t1 - t0;
                    double b = t - t1;
                    boolean even = a > 0.0 && b > 0.0 && Math.abs(a - b) <= EVEN_SPACING * Math.max(a, b);
                    boolean moving = !wheel || (Math.abs(y0) > MOVING_MPS && Math.abs(y1) > MOVING_MPS
                            && Math.abs(y) > MOVING_MPS);
                    if (even && moving) {
                        if (n == d.length) {
                            d = Arrays.copyOf(d, 2 * n);
                        }
                        d[n++] = Math.abs(y - 2.0 * y1 + y0);
                    }
                }
                t0 = t1;
                y0 = y1;
                t1 = t;
                y1 = y;
            }
        }
        if (n < MIN_TRIPLES) {
            return Double.NaN;
        }
        double[] sorted = Arrays.copyOf(d, n);
        Arrays.sort(sorted);
        double median = n % 2 == 1 ? sorted[n / 2] : 0.5 * (sorted[n / 2 - 1] + sorted[n / 2]);
        // The second difference of white noise has 6 times its variance.
        return MAD_TO_SIGMA * median / Math.sqrt(6.0);
    }
}
