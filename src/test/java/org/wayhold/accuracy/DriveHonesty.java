package org.wayhold.accuracy;

import java.util.ArrayList;
import java.util.List;
import org.wayhold.geo.Angles;
import org.wayhold.geo.Enu;
import org.wayhold.geo.LocalFrame;
import org.wayhold.pipeline.FixRecord;
import org.wayhold.pipeline.OrderedLog;
import org.wayhold.pipeline.TrackOutput;
import org.wayhold.pipeline.VehicleTrack;
import org.wayhold.pose.NavState;
import org.wayhold.pose.Pose;
import org.wayhold.sample.FixType;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.ReferencePoint;
import org.wayhold.sample.Sample;
import org.wayhold.scoring.InterpolatedTrack;
import org.wayhold.settings.Settings;

/**
 * How honest the live filter is over a whole drive with a reference trajectory: every pose the service
 * would hold (history points: every fix and every {@code history.interval_s}) is compared with the
 * reference interpolated to its time.
 *
 * <p>Figures, each time-weighted by the spacing of the poses:
 * <ul>
 *   <li>false confidence: seconds with the error above the alert limit while the 95% radius is within
 *       it and the state is not {@code unreliable};</li>
 *   <li>seconds {@code aided} while the error is above the alert limit;</li>
 *   <li>the longest stretch where the error is above 5 m and above the 95% radius;</li>
 *   <li>share of poses whose position lies inside the 95% ellipse (2-dof chi-square 5.991) and whose
 *       heading error lies inside 1.96 sigma (normal 97.5% quantile, two-sided 95%);</li>
 *   <li>open-sky RMS: the fused error at fixes the filter used, against the raw fixes' error.</li>
 * </ul>
 */
public final class DriveHonesty {

    /** 95% quantile of chi-square with 2 degrees of freedom: -2 ln(0.05) (NIST/SEMATECH 1.3.6.7.4). */
    static final double CHI2_2DOF_95 = 5.991464547107979;
    /** Two-sided 95% quantile of the standard normal (NIST/SEMATECH 1.3.6.7.1). */
    static final double NORMAL_95 = 1.959963984540054;

    /**
     * Figures of one drive.
     *
     * @param seconds             time covered by poses (s)
     * @param falseConfidenceS    error > limit, radius <= limit, state not unreliable (s)
     * @param aidedFarS           aided while error > limit (s)
     * @param aidedS              aided (s)
     * @param longestOverS        longest stretch with error > 5 m and > the 95% radius (s)
     * @param inside95            share of time inside the 95% ellipse
     * @param headingInside95     share of time with the heading error inside 1.96 sigma
     * @param fusedRmsM           RMS error of aided poses at used fixes (m)
     * @param rawRmsM             RMS error of the raw fixes at the same times (m)
     * @param maxErrorM           largest error (m)
     * @param aidedInside95       share of the aided time inside the 95% ellipse
     * @param zoneS               time inside the given zones (s)
     * @param zoneAidedFarS       time inside the zones while aided and more than the alert limit off (s)
     */
    public record Figures(double seconds, double falseConfidenceS, double aidedFarS, double aidedS,
                          double longestOverS, double inside95, double headingInside95, double fusedRmsM,
                          double rawRmsM, double maxErrorM, double aidedInside95, double zoneS,
                          double zoneAidedFarS) {
    }

    private DriveHonesty() {
    }

    /**
     * Replays a drive as the service would and compares every held pose with the reference.
     *
     * @param fileOrder the log's samples in file order, with reference lines
     * @param settings  the configuration
     * @param vehicle   the vehicle profile's name
     */
    public static Figures evaluate(List<Sample> fileOrder, Settings settings, String vehicle) {
        return evaluate(fileOrder, settings, vehicle, List.of());
    }

    /**
     * As {@link #evaluate(List, Settings, String)}, with time in given zones counted apart.
     *
     * @param zones {start, end} times (s, vehicle clock) of stretches to count apart (canyons, say)
     */
    public static Figures evaluate(List<Sample> fileOrder, Settings settings, String vehicle, List<double[]> zones) {
        OrderedLog ordered = OrderedLog.order(fileOrder, settings.ordering());
        List<ReferencePoint> refs = new ArrayList<>();
        GnssFix first = null;
        for (Sample s : ordered.samples()) {
            if (s instanceof ReferencePoint r) {
                refs.add(r);
            } else if (first == null && s instanceof GnssFix g && g.fix() != FixType.NONE) {
                first = g;
            }
        }
        if (first == null || refs.size() < 2) {
            throw new IllegalArgumentException("the drive needs fixes and reference lines");
        }
        LocalFrame frame = VehicleTrack.frameFor(first, null);
        InterpolatedTrack ref = InterpolatedTrack.ofReference(refs, frame, 1.0);
        List<Pose> poses = new ArrayList<>();
        List<FixRecord> fixes = new ArrayList<>();
        VehicleTrack track = new VehicleTrack(settings, settings.profileFor(vehicle), null, new TrackOutput() {
            @Override
            public void pose(Pose pose) {
                if (!poses.isEmpty() && poses.get(poses.size() - 1).t() == pose.t()) {
                    poses.set(poses.size() - 1, pose);
                } else {
                    poses.add(pose);
                }
            }

            @Override
            public void fix(FixRecord record) {
                fixes.add(record);
            }

            @Override
            public void rewoundTo(double tS) {
                throw new IllegalStateException("an ordered log never rewinds");
            }
        });
        ordered.samples().forEach(track::apply);
        double limit = settings.outage().alertLimitM();
        double seconds = 0;
        double falseConf = 0;
        double aidedFar = 0;
        double aided = 0;
        double inside = 0;
        double headingInside = 0;
        double headingTime = 0;
        double longest = 0;
        double run = 0;
        double maxErr = 0;
        double aidedInside = 0;
        double zone = 0;
        double zoneFar = 0;
        for (int i = 0; i + 1 < poses.size(); i++) {
            Pose p = poses.get(i);
            double dt = poses.get(i + 1).t() - p.t();
            if (p.state() == NavState.INITIALIZING || !ref.covers(p.t()) || dt > 2.0) {
                run = 0;
                continue;
            }
            double de = p.eastM() - ref.eastAt(p.t());
            double dn = p.northM() - ref.northAt(p.t());
            double err = Math.hypot(de, dn);
            maxErr = Math.max(maxErr, err);
            double r95 = p.radius95M();
            seconds += dt;
            if (err > limit && r95 <= limit && p.state() != NavState.UNRELIABLE) {
                falseConf += dt;
            }
            if (p.state() == NavState.AIDED) {
                aided += dt;
                if (err > limit) {
                    aidedFar += dt;
                }
            }
            double a = p.covEastEastM2();
            double b = p.covEastNorthM2();
            double c = p.covNorthNorthM2();
            double nees = (c * de * de - 2 * b * de * dn + a * dn * dn) / (a * c - b * b);
            if (nees <= CHI2_2DOF_95) {
                inside += dt;
                if (p.state() == NavState.AIDED) {
                    aidedInside += dt;
                }
            }
            if (inZone(zones, p.t())) {
                zone += dt;
                if (p.state() == NavState.AIDED && err > limit) {
                    zoneFar += dt;
                }
            }
            double refYaw = ref.yawAt(p.t());
            if (!Double.isNaN(refYaw) && Math.abs(p.speedMps()) > 1.0) {
                double yaw = Angles.headingDegToYawRad(p.headingDeg());
                double dy = Math.abs(Angles.wrapPi(yaw - refYaw));
                headingTime += dt;
                if (dy <= NORMAL_95 * Math.toRadians(p.headingSigmaDeg())) {
                    headingInside += dt;
                }
            }
            if (err > 5.0 && err > r95) {
                run += dt;
                longest = Math.max(longest, run);
            } else {
                run = 0;
            }
        }
        double sqFused = 0;
        double sqRaw = 0;
        int n = 0;
        int k = 0;
        for (FixRecord f : fixes) {
            if (!f.outcome().equals(org.wayhold.filter.GnssOutcome.Kind.ACCEPTED) || !ref.covers(f.t())) {
                continue;
            }
            while (k + 1 < poses.size() && poses.get(k).t() < f.t()) {
                k++;
            }
            Pose p = poses.get(k);
            if (p.t() != f.t()) {
                continue;
            }
            double re = ref.eastAt(f.t());
            double rn = ref.northAt(f.t());
            sqFused += sq(p.eastM() - re) + sq(p.northM() - rn);
            sqRaw += sq(f.eastM() - re) + sq(f.northM() - rn);
            n++;
        }
        return new Figures(seconds, falseConf, aidedFar, aided, longest, inside / seconds,
                headingTime == 0 ? Double.NaN : headingInside / headingTime, Math.sqrt(sqFused / Math.max(n, 1)),
                Math.sqrt(sqRaw / Math.max(n, 1)), maxErr, aided == 0 ? Double.NaN : aidedInside / aided, zone,
                zoneFar);
    }

    private static boolean inZone(List<double[]> zones, double t) {
        for (double[] z : zones) {
            if (t >= z[0] && t <= z[1]) {
                return true;
            }
        }
        return false;
    }

    private static double sq(double v) {
        return v * v;
    }

    /** The ENU position of a fix in a frame (m), for callers that compare fixes themselves. */
    static Enu enu(LocalFrame frame, GnssFix g) {
        return frame.toEnu(g.latDeg(), g.lonDeg(), g.hasAlt() ? g.altM() : frame.origin().altM());
    }
}
