package org.wayhold.session;

import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;
import org.wayhold.geo.Geodetic;
import org.wayhold.geo.LocalFrame;
import org.wayhold.sample.FixType;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;

/**
 * A seeded drive of our own for session tests: a car at 10-18 m/s with alternating left and right
 * bends, exact arc kinematics at 100 Hz, sensors with a 1% wheel-speed scale error, a 0.2 deg/s gyro
 * bias and white noise, and 5 Hz fixes (with speed and course) reporting sigma_h = 1 m and carrying
 * an error of that size that matches the filter's default error model: 60% of the variance a
 * first-order Gauss-Markov wander with a 40 s correlation time, the rest white. Fixes stop during
 * {@code [outageFromS, outageToS)} relative to the start.
 */
public final class SyntheticDrive {

    static final Geodetic ORIGIN = new Geodetic(47.3769, 8.5417, 410.0);

    private SyntheticDrive() {
    }

    /**
     * @param t0S        first sample time (s, vehicle clock)
     * @param seconds    drive length (s)
     * @param outageFromS start of the fix gap, relative to t0 (s); NaN for none
     * @param outageToS  end of the fix gap, relative to t0 (s)
     * @param seed       random seed
     * @return samples in time order, inputs before fixes at equal times
     */
    public static List<Sample> generate(double t0S, double seconds, double outageFromS, double outageToS, long seed) {
        SplittableRandom rnd = new SplittableRandom(seed);
        LocalFrame frame = new LocalFrame(ORIGIN);
        double e = 0.0;
        double n = 0.0;
        double yaw = Math.toRadians(30.0);
        double bias = Math.toRadians(0.2);
        double errE = 0.0;
        double errN = 0.0;
        double decay = Math.exp(-0.2 / 40.0);
        double drive = Math.sqrt(0.6 * (1.0 - decay * decay));
        double white = Math.sqrt(0.4);
        List<Sample> out = new ArrayList<>();
        long ticks = Math.round(seconds * 100);
        for (long k = 0; k <= ticks; k++) {
            double rel = k / 100.0;
            double t = t0S + rel;
            double speed = 14.0 + 4.0 * Math.sin(rel / 17.0);
            double phase = rel % 16.0;
            double rate = phase < 6.0 ? 0.0 : 0.12 * Math.sin(Math.PI * (phase - 6.0) / 10.0)
                    * ((((long) (rel / 16.0)) % 2 == 0) ? 1 : -1);
            if (k % 2 == 0) {
                out.add(new WheelSpeed(t, speed / 1.01 + 0.03 * gaussian(rnd)));
            }
            out.add(new YawRate(t, rate + bias + Math.toRadians(0.05) * gaussian(rnd)));
            boolean gap = !Double.isNaN(outageFromS) && rel >= outageFromS && rel < outageToS;
            if (k % 20 == 0) {
                errE = decay * errE + drive * gaussian(rnd);
                errN = decay * errN + drive * gaussian(rnd);
            }
            if (k % 20 == 0 && !gap) {
                Geodetic g = frame.toGeodetic(e + errE + white * gaussian(rnd), n + errN + white * gaussian(rnd), 0.0);
                double course = Math.toDegrees(Math.PI / 2 - yaw) + 0.5 * gaussian(rnd);
                course = ((course % 360.0) + 360.0) % 360.0;
                out.add(new GnssFix(t, g.latDeg(), g.lonDeg(), g.altM(), 1.0, 1.5, FixType.THREE_D, 9, 0.9,
                        speed + 0.1 * gaussian(rnd), course));
            }
            double th = rate * 0.01;
            double chord = th == 0.0 ? speed * 0.01 : speed * 0.01 * Math.sin(th / 2) / (th / 2);
            e += chord * Math.cos(yaw + th / 2);
            n += chord * Math.sin(yaw + th / 2);
            yaw += th;
        }
        return out;
    }

    private static double gaussian(SplittableRandom rnd) {
        double u1 = 1.0 - rnd.nextDouble();
        double u2 = rnd.nextDouble();
        return Math.sqrt(-2.0 * Math.log(u1)) * Math.cos(2.0 * Math.PI * u2);
    }
}
