package org.wayhold.simulate;

import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import org.wayhold.geo.Enu;
import org.wayhold.geo.Geodetic;
import org.wayhold.geo.LocalFrame;
import org.wayhold.sample.Sample;

/**
 * The result of one simulation: the samples a vehicle would log, and the truth behind them.
 *
 * <p>Instances are immutable and safe to share between threads.
 */
public final class SimulatedDrive {

    /**
     * A timestamp within this of a 10 ms tick is taken to mean that tick (s). Near 1.8e9 s one unit in
     * the last place of a double is 2.4e-7 s, so a sample time {@code startT + k / 100.0} cannot carry
     * its tick exactly; snapping makes {@link #truthAt} at a sample's own time return exactly the
     * state the sensors saw.
     */
    private static final double SNAP_S = 1e-6;

    private final SimulationSettings settings;
    private final long seed;
    private final Route route;
    private final TruthTable truth;
    private final LocalFrame frame;
    private final List<Sample> samples;
    private final List<TimeWindow> tunnels;
    private final List<TimeWindow> canyons;
    private final List<GnssFault> faults;
    private final double[] gyroBiasRadPerS;
    private final int gyroTicks;

    SimulatedDrive(SimulationSettings settings, long seed, Route route, TruthTable truth, LocalFrame frame,
                   List<Sample> samples, List<TimeWindow> tunnels, List<TimeWindow> canyons,
                   List<GnssFault> faults, double[] gyroBiasRadPerS, int gyroTicks) {
        this.settings = settings;
        this.seed = seed;
        this.route = route;
        this.truth = truth;
        this.frame = frame;
        this.samples = Collections.unmodifiableList(samples);
        this.tunnels = List.copyOf(tunnels);
        this.canyons = List.copyOf(canyons);
        this.faults = List.copyOf(faults);
        this.gyroBiasRadPerS = gyroBiasRadPerS;
        this.gyroTicks = gyroTicks;
    }

    /** Every sample in time order, all types interleaved, {@code reference} lines included. */
    public List<Sample> samples() {
        return samples;
    }

    /** The samples of one type, in time order; for example {@code samplesOf(GnssFix.class)}. */
    public <T extends Sample> List<T> samplesOf(Class<T> type) {
        List<T> out = new ArrayList<>();
        for (Sample s : samples) {
            if (type.isInstance(s)) {
                out.add(type.cast(s));
            }
        }
        return out;
    }

    /**
     * The true state of the vehicle's reference point at any instant of the drive.
     *
     * @param t time (epoch seconds) within {@code [startT(), endT()]}
     * @throws IllegalArgumentException outside the drive
     */
    public Truth truthAt(double t) {
        double sinceStartS = t - startT();
        double tick = sinceStartS * Route.TICKS_PER_S;
        double nearest = Math.rint(tick);
        if (Math.abs(tick - nearest) * Route.TICK_S <= SNAP_S) {
            tick = nearest;
        }
        if (!(tick >= 0.0 && tick <= truth.ticks())) {
            throw new IllegalArgumentException("t: must lie within the drive [" + startT() + ", " + endT()
                    + "] s, was " + t + " s");
        }
        return truth.at(tick, t);
    }

    /**
     * The true position of a point fixed to the vehicle (such as the GNSS antenna) in the drive's ENU
     * frame (m): the reference point plus the lever arm rotated by the true yaw.
     *
     * @param t        time (epoch seconds) within the drive
     * @param forwardM distance ahead of the reference point (m)
     * @param leftM    distance left of the reference point (m)
     * @param upM      height above the reference point (m); the road is the plane up = 0
     */
    public Enu bodyPointAt(double t, double forwardM, double leftM, double upM) {
        Truth tr = truthAt(t);
        return new Enu(tr.bodyPointEastM(forwardM, leftM), tr.bodyPointNorthM(forwardM, leftM), upM);
    }

    /** The true GNSS antenna position (m, ENU), using the configured lever arm. */
    public Enu antennaAt(double t) {
        GnssSettings g = settings.gnss();
        return bodyPointAt(t, g.leverArmForwardM(), g.leverArmLeftM(), g.leverArmUpM());
    }

    /** The WGS-84 origin of the drive's ENU frame, which is also where the drive starts. */
    public Geodetic origin() {
        return frame.origin();
    }

    /** The drive's ENU frame, to turn sample positions back into metres. */
    public LocalFrame frame() {
        return frame;
    }

    /** Time of the first sample (epoch seconds). */
    public double startT() {
        return settings.route().startT();
    }

    /** End of the drive (epoch seconds): the instant after the last tick; no sample carries it. */
    public double endT() {
        return startT() + truth.ticks() / (double) Route.TICKS_PER_S;
    }

    /** Length of the drive (s). */
    public double durationS() {
        return truth.ticks() * Route.TICK_S;
    }

    /** GNSS-denied intervals, in time order: no fix has a time inside any of them. */
    public List<TimeWindow> tunnels() {
        return tunnels;
    }

    /** Intervals of degraded GNSS (urban canyons), in time order. */
    public List<TimeWindow> canyons() {
        return canyons;
    }

    /** Every outlier, multipath fix and dropped canyon fix, in time order. */
    public List<GnssFault> faults() {
        return faults;
    }

    /**
     * The true gyro bias (rad/s): the bias the reading at or just before {@code t} carried. The bias is
     * constant between gyro samples.
     *
     * @param t time (epoch seconds) within the drive
     */
    public double gyroBiasRadPerSAt(double t) {
        double tick = (t - startT()) * Route.TICKS_PER_S;
        if (!(tick >= -SNAP_S * Route.TICKS_PER_S && tick <= truth.ticks())) {
            throw new IllegalArgumentException("t: must lie within the drive [" + startT() + ", " + endT()
                    + "] s, was " + t + " s");
        }
        int g = (int) Math.floor((tick + SNAP_S * Route.TICKS_PER_S) / gyroTicks);
        return gyroBiasRadPerS[Math.max(0, Math.min(g, gyroBiasRadPerS.length - 1))];
    }

    /**
     * The true wheel-speed scale error (unitless: the sensor reads true speed * (1 + this)), constant
     * over the drive.
     */
    public double speedScaleError() {
        return settings.wheelSpeed().scaleError();
    }

    /** The route the truth follows. */
    public Route route() {
        return route;
    }

    /** The settings this drive was made with. */
    public SimulationSettings settings() {
        return settings;
    }

    /** The seed this drive was made with. */
    public long seed() {
        return seed;
    }
}
