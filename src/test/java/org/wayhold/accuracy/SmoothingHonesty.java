package org.wayhold.accuracy;

import java.util.ArrayList;
import java.util.List;
import org.wayhold.fusion.FusedDrive;
import org.wayhold.geo.Enu;
import org.wayhold.geo.LocalFrame;
import org.wayhold.fusion.FusedPoint;
import org.wayhold.pose.NavState;
import org.wayhold.sample.ReferencePoint;
import org.wayhold.sample.Sample;
import org.wayhold.scoring.InterpolatedTrack;
import org.wayhold.scoring.ReferenceTrack;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.Truth;

/**
 * How honest a fused track is against where the vehicle really was: the share of its points whose
 * true position lies inside the point's 95% ellipse (the normalised error squared within the 2-dof
 * chi-square 0.95 quantile 5.991, NIST/SEMATECH e-Handbook 1.3.6.7.4), their RMS and largest error,
 * over all points with a state and over the points inside GNSS gaps.
 */
public final class SmoothingHonesty {

    /** 95% quantile of chi-square with 2 degrees of freedom: -2 ln(0.05) (NIST/SEMATECH 1.3.6.7.4). */
    static final double CHI2_2DOF_95 = 5.991464547107979;

    /**
     * Figures of one track.
     *
     * @param points      points compared (count)
     * @param inside95    share of them inside their 95% ellipse
     * @param rmsM        RMS horizontal error (m)
     * @param maxM        largest horizontal error (m)
     * @param gapPoints   points inside GNSS gaps (count)
     * @param gapInside95 share of those inside their 95% ellipse (NaN when none)
     * @param gapRmsM     their RMS error (m, NaN when none)
     * @param insideCount points inside their ellipse (count), to pool drives
     * @param gapInsideCount gap points inside their ellipse (count)
     */
    public record Figures(int points, double inside95, double rmsM, double maxM, int gapPoints, double gapInside95,
                          double gapRmsM, int insideCount, int gapInsideCount) {
    }

    private SmoothingHonesty() {
    }

    /** The log's reference lines as a track in the fused drive's frame. */
    public static ReferenceTrack reference(FusedDrive drive, List<Sample> samples) {
        List<ReferencePoint> refs = new ArrayList<>();
        for (Sample s : samples) {
            if (s instanceof ReferencePoint r) {
                refs.add(r);
            }
        }
        refs.sort((a, b) -> Double.compare(a.t(), b.t()));
        InterpolatedTrack t = InterpolatedTrack.ofReference(refs, drive.frame(), 1.0);
        return new ReferenceTrack() {
            @Override
            public boolean covers(double tS) {
                return t.covers(tS);
            }

            @Override
            public double eastAt(double tS) {
                return t.eastAt(tS);
            }

            @Override
            public double northAt(double tS) {
                return t.northAt(tS);
            }

            @Override
            public double yawAt(double tS) {
                return t.yawAt(tS);
            }
        };
    }

    /**
     * A simulator's truth in the fused drive's frame: the session takes its origin at the first fix,
     * which lies off the simulator's origin by that fix's error, so the truth is carried over through
     * geodetic coordinates.
     */
    public static ReferenceTrack truth(FusedDrive drive, SimulatedDrive sim) {
        LocalFrame from = sim.frame();
        LocalFrame to = drive.frame();
        return new ReferenceTrack() {
            @Override
            public boolean covers(double tS) {
                return tS >= sim.startT() && tS <= sim.endT();
            }

            private Enu at(double tS) {
                Truth t = sim.truthAt(tS);
                return to.toEnu(from.toGeodetic(t.eastM(), t.northM(), 0.0));
            }

            @Override
            public double eastAt(double tS) {
                return at(tS).eastM();
            }

            @Override
            public double northAt(double tS) {
                return at(tS).northM();
            }

            @Override
            public double yawAt(double tS) {
                Truth t = sim.truthAt(tS);
                return t.speedMps() < 0 ? t.yawRad() + Math.PI : t.yawRad();
            }
        };
    }

    /** Compares a track's points that have a state with the reference. */
    public static Figures of(List<FusedPoint> track, ReferenceTrack ref) {
        int n = 0;
        int inside = 0;
        double sq = 0;
        double max = 0;
        int gn = 0;
        int gInside = 0;
        double gSq = 0;
        for (FusedPoint p : track) {
            if (p.state() == NavState.INITIALIZING || !ref.covers(p.t())) {
                continue;
            }
            double de = p.eastM() - ref.eastAt(p.t());
            double dn = p.northM() - ref.northAt(p.t());
            double a = p.covEastEastM2();
            double b = p.covEastNorthM2();
            double c = p.covNorthNorthM2();
            double nees = (c * de * de - 2 * b * de * dn + a * dn * dn) / (a * c - b * b);
            double e2 = de * de + dn * dn;
            boolean in = nees <= CHI2_2DOF_95;
            n++;
            inside += in ? 1 : 0;
            sq += e2;
            max = Math.max(max, Math.sqrt(e2));
            if (p.inGap()) {
                gn++;
                gInside += in ? 1 : 0;
                gSq += e2;
            }
        }
        return new Figures(n, (double) inside / n, Math.sqrt(sq / n), max, gn,
                gn == 0 ? Double.NaN : (double) gInside / gn, gn == 0 ? Double.NaN : Math.sqrt(gSq / gn), inside,
                gInside);
    }
}
