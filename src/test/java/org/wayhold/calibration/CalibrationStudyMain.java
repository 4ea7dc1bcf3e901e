package org.wayhold.calibration;

import java.util.List;
import java.util.Locale;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.GnssLatency;
import org.wayhold.simulate.GyroScale;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;

/**
 * Prints what {@link Calibration} recovers on seeded simulated drives with known parameters, with the
 * time it took: the figures behind {@code CalibrationRecoveryTest}'s tolerances. Arguments: minutes per
 * drive, seed.
 */
public final class CalibrationStudyMain {

    private CalibrationStudyMain() {
    }

    public static void main(String[] args) {
        double minutes = args.length > 0 ? Double.parseDouble(args[0]) : 20;
        long seed = args.length > 1 ? Long.parseLong(args[1]) : 1;
        SimulationSettings sim = SimulatedTruth.settings(minutes);
        SimulatedDrive drive = DriveSimulator.simulate(sim, seed);
        Settings base = Settings.defaults();
        long t0 = System.nanoTime();
        CalibrationDrive d = CalibrationDrive.of("sim", drive.samples(), base.ordering());
        CalibrationResult r = Calibration.fit(List.of(d), base, new Calibration.Options("default", 400),
                new Calibration.Listener() {
                    @Override
                    public void stage(String what) {
                        System.out.printf(Locale.ROOT, "%6.1f s %s%n", (System.nanoTime() - t0) / 1e9, what);
                    }

                    @Override
                    public void evaluation(int count, double logLikelihood, double best) {
                        if (count % 10 == 0) {
                            System.out.printf(Locale.ROOT, "%6.1f s   eval %d lnL %.2f best %.2f%n",
                                    (System.nanoTime() - t0) / 1e9, count, logLikelihood, best);
                        }
                    }
                });
        System.out.printf(Locale.ROOT, "samples %d, %.1f s, %d evaluations, counted %d, lnL %.2f -> %.2f%n",
                d.samples().size(), (System.nanoTime() - t0) / 1e9, r.evaluations(), r.countedFixes(),
                r.startLogLikelihood(), r.logLikelihood());
        double[] truth = SimulatedTruth.values(sim);
        for (Parameter p : Parameter.values()) {
            Estimate e = r.estimate(p);
            System.out.printf(Locale.ROOT, "%-32s truth %12.6g  start %12.6g  fit %12.6g  se %10.3g  drop %8.2f %s %s%n",
                    p.label(), truth[p.ordinal()], e.start(), e.fitted(), e.standardError(), e.drop(),
                    e.kept() ? "kept" : "LEFT", e.note());
        }
        System.out.printf(Locale.ROOT, "wheel noise %.4f (truth %.4f, flat %.2f), gyro noise %.5f deg/s (truth %.5f, flat %.2f)%n",
                r.wheelNoiseMps(), sim.wheelSpeed().noiseMps(), r.wheelFlatness(),
                Math.toDegrees(r.gyroNoiseRadPerS()), sim.yawRate().noiseDegPerS(), r.gyroFlatness());
        System.out.printf(Locale.ROOT, "gyro bias %.4f deg/s (truth start %.4f), mean NIS %.2f -> %.2f%n",
                Math.toDegrees(r.gyroBiasRadPerS()), sim.yawRate().biasDegPerS(), r.configuredMeanNis(),
                r.calibratedMeanNis());
    }
}
