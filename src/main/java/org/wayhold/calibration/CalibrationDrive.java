package org.wayhold.calibration;

import java.util.ArrayList;
import java.util.List;
import org.wayhold.pipeline.OrderedLog;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.settings.OrderingSettings;

/**
 * One recorded drive, in the order the service would apply its samples.
 *
 * @param name    name shown in progress and reports
 * @param samples samples in processing order ({@link OrderedLog})
 */
public record CalibrationDrive(String name, List<Sample> samples) {

    public CalibrationDrive {
        if (name == null || name.isBlank()) {
            throw new IllegalArgumentException("name: a drive needs a name");
        }
        samples = List.copyOf(samples);
    }

    /**
     * A log put through the service's time ordering (duplicates dropped, implausible times refused).
     *
     * @param fileOrder the log's samples as read
     */
    public static CalibrationDrive of(String name, List<? extends Sample> fileOrder, OrderingSettings ordering) {
        return new CalibrationDrive(name, OrderedLog.order(fileOrder, ordering).samples());
    }

    /**
     * The same drive with GNSS speed and course taken off the fixes (positions kept): the filter's
     * course model leaves the fix latency out, so in a turn a late course reads as the course lag of an
     * antenna behind the reference point, and a drive with courses would pin the forward lever arm at
     * -speed x latency.
     *
     * @return this drive when no fix carries speed or course
     */
    public CalibrationDrive positionsOnly() {
        if (samples.stream().noneMatch(s -> s instanceof GnssFix f && (f.hasSpeed() || f.hasCourse()))) {
            return this;
        }
        List<Sample> out = new ArrayList<>(samples.size());
        for (Sample s : samples) {
            if (s instanceof GnssFix f && (f.hasSpeed() || f.hasCourse())) {
                out.add(new GnssFix(f.t(), f.latDeg(), f.lonDeg(), f.altM(), f.sigmaHM(), f.sigmaVM(), f.fix(),
                        f.sats(), f.hdop(), Double.NaN, Double.NaN));
            } else {
                out.add(s);
            }
        }
        return new CalibrationDrive(name, out);
    }

    /** True when some fix carries a GNSS speed or course. */
    public boolean hasVelocity() {
        return samples.stream().anyMatch(s -> s instanceof GnssFix f && (f.hasSpeed() || f.hasCourse()));
    }

    /** Time of the first sample (s), NaN when empty. */
    public double startT() {
        return samples.isEmpty() ? Double.NaN : samples.get(0).t();
    }

    /** Time of the last sample (s), NaN when empty. */
    public double endT() {
        return samples.isEmpty() ? Double.NaN : samples.get(samples.size() - 1).t();
    }

    /**
     * The drive cut at a share of its length: the part before and the part from the cut on.
     *
     * @param fitShare share of the time span kept for the first part (0..1)
     */
    public List<CalibrationDrive> split(double fitShare) {
        if (!(fitShare >= 0.0 && fitShare <= 1.0)) {
            throw new IllegalArgumentException("fit share: must lie in [0, 1], was " + fitShare);
        }
        double cut = startT() + fitShare * (endT() - startT());
        List<Sample> first = new ArrayList<>();
        List<Sample> rest = new ArrayList<>();
        for (Sample s : samples) {
            (s.t() < cut ? first : rest).add(s);
        }
        return List.of(new CalibrationDrive(name, first), new CalibrationDrive(name, rest));
    }
}
