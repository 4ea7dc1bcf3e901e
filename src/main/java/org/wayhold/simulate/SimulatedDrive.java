package org.wayhold.simulate;

import java.util.ArrayList;
import java.util.Collections;
import java.util.EnumMap;
import java.util.List;
import java.util.Map;
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
    private final Map<Zone, List<TimeWindow>> windows;
    private final List<GnssFault> faults;
    private final double[] gyroBiasRadPerS;
    private final int gyroTicks;

    SimulatedDrive(SimulationSettings settings, long seed, Route route, TruthTable truth, LocalFrame frame,
                   List<Sample> samples, Map<Zone, List<TimeWindow>> windows,
                   List<GnssFault> faults, double[] gyroBiasRadPerS, int gyroTicks) {
        this.settings = settings;
        this.seed = seed;
        this.route = route;
        this.truth = truth;
        this.frame = frame;
        this.samples = Collections.unmodifiableList(samples);
        this.windows = new EnumMap<>(Zone.class);
        for (Zone z : Zone.values()) {
            this.windows.put(z, List.copyOf(windows.getOrDefault(z, List.of())));
        }
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
     * frame (m): the reference point plus the lever arm pitched by the grade and rotated by the yaw.
     *
     * @param t        time (epoch seconds) within the drive
     * @param forwardM distance ahead of the reference point (m)
     * @param leftM    distance left of the reference point (m)
     * @param upM      height above the reference point, along the body's z axis (m)
     */
    public Enu bodyPointAt(double t, double forwardM, double leftM, double upM) {
        Truth tr = truthAt(t);
        return new Enu(tr.bodyPointEastM(forwardM, leftM, upM), tr.bodyPointNorthM(forwardM, leftM, upM),
                tr.bodyPointUpM(forwardM, upM));
    }

    /**
     * The true GNSS antenna position (m, ENU) at {@code t}, using the configured lever arm. With
     * {@link GnssLatency} on, the fix stamped t shows the antenna at {@code t - latency}.
     */
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

    /** Tunnels, in time order: no fix has a time of validity inside any of them. */
    public List<TimeWindow> tunnels() {
        return windows.get(Zone.TUNNEL);
    }

    /** Intervals of degraded GNSS (urban canyons), in time order. */
    public List<TimeWindow> canyons() {
        return windows.get(Zone.CANYON);
    }

    /** Garage visits, entrance to exit, in time order: GNSS denied like a tunnel. */
    public List<TimeWindow> garages() {
        return windows.get(Zone.GARAGE);
    }

    /** Traffic-light queues, from the stop at the back to the launch on green, in time order. */
    public List<TimeWindow> queues() {
        return windows.get(Zone.QUEUE);
    }

    /** Long standstills, in time order. */
    public List<TimeWindow> longStops() {
        return windows.get(Zone.LONG_STOP);
    }

    /** Motorway stretches, slip roads included, in time order. */
    public List<TimeWindow> motorways() {
        return windows.get(Zone.MOTORWAY);
    }

    /** The stretches of one kind, in time order. */
    public List<TimeWindow> windows(Zone zone) {
        return windows.get(zone);
    }

    /** Every GNSS-denied interval (tunnels and garages), in time order. */
    public List<TimeWindow> gnssDenied() {
        List<TimeWindow> out = new ArrayList<>(tunnels());
        out.addAll(garages());
        out.sort((a, b) -> Double.compare(a.startT(), b.startT()));
        return List.copyOf(out);
    }

    /** Every outlier, multipath fix, dropped canyon fix and NLOS-biased canyon fix, in time order. */
    public List<GnssFault> faults() {
        return faults;
    }

    /**
     * The true gyro bias (rad/s): the bias the reading at or just before {@code t} carried, the warm-up
     * offset included. The bias is constant between gyro samples.
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
     * over the drive. Tyre growth and slip, when switched on, change the reading on top of it with
     * speed and acceleration.
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
