package org.wayhold.scoring;

import java.util.Arrays;
import java.util.List;
import org.wayhold.geo.Angles;
import org.wayhold.geo.Enu;
import org.wayhold.geo.LocalFrame;
import org.wayhold.sample.FixType;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.ReferencePoint;

/**
 * A reference known at discrete points and interpolated linearly in ENU between neighbours.
 *
 * <p>Built either from a log's {@code reference} lines (a trajectory: evaluated on a regular time step)
 * or from its GNSS fixes (the withheld fixes: evaluated only at the fix times, so no interpolated
 * position is ever scored). Yaw comes from the points' headings where both neighbours give one, else
 * from the direction of travel between the nearest points at least {@link #MIN_BASELINE_M} apart, so a
 * standstill's jitter does not pick a direction. Immutable and safe to share between threads.
 */
public final class InterpolatedTrack implements ReferenceTrack {

    /**
     * Shortest baseline for a yaw from the track direction (m): ten times the centimetre jitter of a
     * reference trajectory, and short enough to follow a bend at road speed.
     */
    public static final double MIN_BASELINE_M = 0.5;
    /** Points searched on each side for that baseline. */
    private static final int BASELINE_SEARCH = 50;

    private final double[] t;
    private final double[] east;
    private final double[] north;
    private final double[] up;
    private final double[] yaw;
    private final double maxGapS;
    private final boolean continuous;
    private final boolean atAntenna;

    /**
     * @param tS         point times (s, vehicle clock, strictly ascending)
     * @param eastM      east of each point (m)
     * @param northM     north of each point (m)
     * @param upM        up of each point (m)
     * @param yawRad     yaw of each point (rad, counter-clockwise from east), NaN where unknown
     * @param maxGapS    neighbours farther apart than this do not cover the time between them (s, > 0)
     * @param continuous true for a trajectory, false to evaluate only at the points
     */
    public InterpolatedTrack(double[] tS, double[] eastM, double[] northM, double[] upM, double[] yawRad,
                             double maxGapS, boolean continuous) {
        this(tS, eastM, northM, upM, yawRad, maxGapS, continuous, false);
    }

    private InterpolatedTrack(double[] tS, double[] eastM, double[] northM, double[] upM, double[] yawRad,
                              double maxGapS, boolean continuous, boolean atAntenna) {
        this.atAntenna = atAntenna;
        int n = tS.length;
        if (eastM.length != n || northM.length != n || upM.length != n || yawRad.length != n) {
            throw new IllegalArgumentException("points: times, east, north, up and yaw must be as many, were "
                    + n + ", " + eastM.length + ", " + northM.length + ", " + upM.length + ", " + yawRad.length);
        }
        for (int i = 1; i < n; i++) {
            if (!(tS[i] > tS[i - 1])) {
                throw new IllegalArgumentException("t: reference times must be strictly ascending, point " + i
                        + " at " + tS[i] + " s follows " + tS[i - 1] + " s");
            }
        }
        if (!(maxGapS > 0.0)) {
            throw new IllegalArgumentException("maxGapS: must be a positive number of s, was " + maxGapS);
        }
        this.t = tS.clone();
        this.east = eastM.clone();
        this.north = northM.clone();
        this.up = upM.clone();
        this.yaw = yawRad.clone();
        this.maxGapS = maxGapS;
        this.continuous = continuous;
    }

    /**
     * The trajectory of a log's {@code reference} lines (in time order; a point at the same time as
     * the one before it is dropped). A point without height is put at the frame origin's height.
     *
     * @param maxGapS longest spacing of points that is interpolated across (s)
     */
    public static InterpolatedTrack ofReference(List<ReferencePoint> points, LocalFrame frame, double maxGapS) {
        int n = points.size();
        double[] ts = new double[n];
        double[] e = new double[n];
        double[] no = new double[n];
        double[] u = new double[n];
        double[] y = new double[n];
        int k = 0;
        for (ReferencePoint p : points) {
            if (k > 0 && !(p.t() > ts[k - 1])) {
                continue;
            }
            Enu enu = frame.toEnu(p.latDeg(), p.lonDeg(), p.hasAlt() ? p.altM() : frame.origin().altM());
            ts[k] = p.t();
            e[k] = enu.eastM();
            no[k] = enu.northM();
            u[k] = enu.upM();
            y[k] = p.hasHeading() ? Angles.headingDegToYawRad(p.headingDeg()) : Double.NaN;
            k++;
        }
        return new InterpolatedTrack(Arrays.copyOf(ts, k), Arrays.copyOf(e, k), Arrays.copyOf(no, k),
                Arrays.copyOf(u, k), Arrays.copyOf(y, k), maxGapS, true);
    }

    /**
     * The withheld fixes as the reference: every fix with a solution ({@code fix} other than
     * {@code none}), evaluated only at the fix times. Yaw from the direction of travel (a fix's course
     * is left out: it is noisy at low speed and absent in many logs).
     *
     * @param maxGapS fixes farther apart than this are a real gap, not covered (s), normally the
     *                configured {@code outage.gap_s}
     */
    public static InterpolatedTrack ofFixes(List<GnssFix> fixes, LocalFrame frame, double maxGapS) {
        int n = fixes.size();
        double[] ts = new double[n];
        double[] e = new double[n];
        double[] no = new double[n];
        double[] u = new double[n];
        double[] y = new double[n];
        Arrays.fill(y, Double.NaN);
        int k = 0;
        for (GnssFix f : fixes) {
            if (f.fix() == FixType.NONE || (k > 0 && !(f.t() > ts[k - 1]))) {
                continue;
            }
            Enu enu = frame.toEnu(f.latDeg(), f.lonDeg(), f.hasAlt() ? f.altM() : frame.origin().altM());
            ts[k] = f.t();
            e[k] = enu.eastM();
            no[k] = enu.northM();
            u[k] = enu.upM();
            k++;
        }
        return new InterpolatedTrack(Arrays.copyOf(ts, k), Arrays.copyOf(e, k), Arrays.copyOf(no, k),
                Arrays.copyOf(u, k), Arrays.copyOf(y, k), maxGapS, false, true);
    }

    /** Number of points. */
    public int size() {
        return t.length;
    }

    /** Time of point {@code i} (s). */
    public double timeAt(int i) {
        return t[i];
    }

    /** East of point {@code i} (m). */
    public double pointEastM(int i) {
        return east[i];
    }

    /** North of point {@code i} (m). */
    public double pointNorthM(int i) {
        return north[i];
    }

    /**
     * Index of the last point at or before {@code tS}, -1 before the first.
     */
    private int floorIndex(double tS) {
        int i = Arrays.binarySearch(t, tS);
        return i >= 0 ? i : -i - 2;
    }

    @Override
    public boolean covers(double tS) {
        if (t.length == 0 || tS < t[0] || tS > t[t.length - 1]) {
            return false;
        }
        int i = floorIndex(tS);
        return t[i] == tS || t[i + 1] - t[i] <= maxGapS;
    }

    @Override
    public double eastAt(double tS) {
        return interpolate(east, tS);
    }

    @Override
    public double northAt(double tS) {
        return interpolate(north, tS);
    }

    /** Up at {@code tS} (m), interpolated like east and north. */
    public double upAt(double tS) {
        return interpolate(up, tS);
    }

    private double interpolate(double[] v, double tS) {
        requireCovered(tS);
        int i = floorIndex(tS);
        if (t[i] == tS || i == t.length - 1) {
            return v[i];
        }
        double w = (tS - t[i]) / (t[i + 1] - t[i]);
        return v[i] + w * (v[i + 1] - v[i]);
    }

    private void requireCovered(double tS) {
        if (t.length == 0 || tS < t[0] || tS > t[t.length - 1]) {
            throw new IllegalArgumentException("t: " + tS + " s is outside the reference, which spans "
                    + (t.length == 0 ? "nothing" : t[0] + " to " + t[t.length - 1] + " s"));
        }
    }

    @Override
    public double yawAt(double tS) {
        requireCovered(tS);
        int i = floorIndex(tS);
        int j = Math.min(i + 1, t.length - 1);
        if (t[i] == tS && !Double.isNaN(yaw[i])) {
            return yaw[i];
        }
        if (!Double.isNaN(yaw[i]) && !Double.isNaN(yaw[j])) {
            double w = t[j] == t[i] ? 0.0 : (tS - t[i]) / (t[j] - t[i]);
            // Interpolate along the shorter arc, so 179 deg and -179 deg meet at 180 deg.
            return Angles.wrapPi(yaw[i] + w * Angles.wrapPi(yaw[j] - yaw[i]));
        }
        return travelYaw(i, j);
    }

    /** Direction of travel between the nearest points around i..j at least the baseline apart. */
    private double travelYaw(int i, int j) {
        int a = i;
        int b = j;
        for (int step = 0; step < BASELINE_SEARCH; step++) {
            double de = east[b] - east[a];
            double dn = north[b] - north[a];
            if (Math.hypot(de, dn) >= MIN_BASELINE_M) {
                return Math.atan2(dn, de);
            }
            if (a > 0) {
                a--;
            }
            if (b < t.length - 1) {
                b++;
            }
        }
        return Double.NaN;
    }

    /** True for the withheld fixes: their points are where the GNSS antenna was. */
    @Override
    public boolean atAntenna() {
        return atAntenna;
    }

    @Override
    public boolean continuous() {
        return continuous;
    }

    @Override
    public double[] timesWithin(double fromT, double toT) {
        int lo = Arrays.binarySearch(t, fromT);
        lo = lo >= 0 ? lo : -lo - 1;
        int hi = Arrays.binarySearch(t, toT);
        hi = hi >= 0 ? hi + 1 : -hi - 1;
        return lo >= hi ? new double[0] : Arrays.copyOfRange(t, lo, hi);
    }
}
