package org.wayhold.fusion;

import java.util.ArrayList;
import java.util.List;
import org.wayhold.filter.RtsSmoother;
import org.wayhold.filter.SmoothedState;
import org.wayhold.filter.SmoothedTrack;
import org.wayhold.filter.SmootherLog;
import org.wayhold.geo.Angles;
import org.wayhold.geo.Geodetic;
import org.wayhold.geo.LocalFrame;
import org.wayhold.pipeline.FixRecord;
import org.wayhold.pipeline.OrderedLog;
import org.wayhold.pipeline.TrackOutput;
import org.wayhold.pipeline.VehicleTrack;
import org.wayhold.pose.Ellipse95;
import org.wayhold.pose.Pose;
import org.wayhold.pose.Radius95;
import org.wayhold.sample.Sample;
import org.wayhold.scoring.GnssGaps;
import org.wayhold.scoring.TimeSpan;
import org.wayhold.settings.Settings;
import org.wayhold.settings.VehicleProfile;

/**
 * Fuses a whole recorded drive with the per-vehicle pipeline every other path runs: the log is put in
 * processing order by the service's time ordering ({@link OrderedLog}) and applied to a
 * {@link VehicleTrack}, whose poses (every fix and every {@code history.interval_s}) are the forward
 * track, exactly what a live session fed the same log would have held. With smoothing, the track keeps
 * its forward pass ({@link VehicleTrack#recordForSmoothing()}, one node per pose) and the
 * Rauch-Tung-Striebel backward pass ({@link RtsSmoother}) gives every pose's estimate from all the data
 * of the drive.
 *
 * <p>A smoothed point takes position, heading, covariance, ellipse and radius from the smoother; its
 * height, speed, navigation state and reasons stay the forward filter's (the height channel is not
 * part of the smoothed state, and the state says what the filter knew at that time). Points taken
 * while the filter had no state (before its start, after a reset) are the same in both tracks.
 */
public final class DriveFusion {

    private DriveFusion() {
    }

    /**
     * Fuses one log.
     *
     * @param name      the log's name, for the result
     * @param fileOrder the log's samples as read
     * @param settings  the configuration
     * @param profile   the vehicle's profile
     * @param smooth    true to smooth as well
     * @throws IllegalArgumentException naming the log when it has no fix with a solution
     */
    public static FusedDrive fuse(String name, List<? extends Sample> fileOrder, Settings settings,
                                  VehicleProfile profile, boolean smooth) {
        OrderedLog ordered = OrderedLog.order(fileOrder, settings.ordering());
        List<Sample> samples = ordered.samples();
        if (Double.isNaN(GnssGaps.firstFixT(samples))) {
            throw new IllegalArgumentException(name + ": has no GNSS fix with a solution, nothing to fuse");
        }
        List<String> notes = new ArrayList<>();
        if (ordered.duplicates() > 0) {
            notes.add(ordered.duplicates() + " duplicate samples ignored, as the service ignores them");
        }
        if (!ordered.rejected().isEmpty()) {
            OrderedLog.Refused first = ordered.rejected().get(0);
            notes.add(ordered.rejected().size() + " samples refused by the time ordering, as the service would"
                    + " refuse them; the first, sample " + (first.index() + 1) + " of the log: "
                    + first.admission().reason());
        }
        List<TimeSpan> gaps = GnssGaps.find(samples, settings.outage().gapS());
        Collector collector = new Collector();
        VehicleTrack track = new VehicleTrack(settings, profile, null, collector);
        SmootherLog log = smooth ? track.recordForSmoothing() : null;
        collector.log = log;
        for (Sample s : samples) {
            track.apply(s);
        }
        LocalFrame frame = track.frame();
        GapIndex inGap = new GapIndex(gaps);
        List<FusedPoint> forward = new ArrayList<>(collector.poses.size());
        for (Pose p : collector.poses) {
            forward.add(point(p, inGap.contains(p.t())));
        }
        if (log == null) {
            return new FusedDrive(name, frame, forward, List.of(), gaps, null, notes);
        }
        log.finish();
        SmoothedTrack smoothed = RtsSmoother.smooth(log);
        List<FusedPoint> back = new ArrayList<>(forward.size());
        for (int i = 0; i < collector.poses.size(); i++) {
            int node = collector.nodes.get(i);
            FusedPoint f = forward.get(i);
            back.add(smoothed.hasState(node) ? smoothedPoint(f, smoothed.state(node), frame) : f);
        }
        FusedDrive.Smoothing stats = new FusedDrive.Smoothing(log.nodeCount(), log.segmentCount(), log.cuts(),
                log.foldedChanges(), log.bytes(), smoothed.pseudoInverseSteps());
        return new FusedDrive(name, frame, forward, back, gaps, stats, notes);
    }

    private static FusedPoint point(Pose p, boolean inGap) {
        return new FusedPoint(p.t(), p.latDeg(), p.lonDeg(), p.altM(), p.eastM(), p.northM(), p.upM(), p.headingDeg(),
                p.headingSigmaDeg(), p.speedMps(), p.covEastEastM2(), p.covEastNorthM2(), p.covNorthNorthM2(),
                p.ellipse95(), p.radius95M(), p.state(), p.reasons(), inGap);
    }

    /** The forward point with the smoother's position, heading and covariance. */
    static FusedPoint smoothedPoint(FusedPoint f, SmoothedState s, LocalFrame frame) {
        double lat = Double.NaN;
        double lon = Double.NaN;
        double height = Double.NaN;
        try {
            Geodetic g = frame.toGeodetic(s.eastM(), s.northM(), f.upM());
            lat = g.latDeg();
            lon = g.lonDeg();
            height = g.altM();
        } catch (IllegalArgumentException e) {
            // As for poses: a position no geodetic coordinates exist for keeps its ENU values only.
        }
        double ee = s.covEastEastM2();
        double en = s.covEastNorthM2();
        double nn = s.covNorthNorthM2();
        return new FusedPoint(f.t(), lat, lon, height, s.eastM(), s.northM(), f.upM(),
                Angles.yawRadToHeadingDeg(s.yawRad()), Math.toDegrees(Math.sqrt(Math.max(s.varYawRad2(), 0.0))),
                f.speedMps(), ee, en, nn, Ellipse95.of(ee, en, nn), Radius95.of(ee, en, nn), f.state(), f.reasons(),
                f.inGap());
    }

    /** The track's poses, one per history point, with the smoothing node taken at each. */
    private static final class Collector implements TrackOutput {
        final List<Pose> poses = new ArrayList<>();
        final List<Integer> nodes = new ArrayList<>();
        SmootherLog log;

        @Override
        public void pose(Pose pose) {
            int node = log == null ? -1 : log.nodeCount() - 1;
            // Two history points at one time (a fix after another sample of its time): the later, which
            // has seen everything of that time, stands for both.
            if (!poses.isEmpty() && poses.get(poses.size() - 1).t() == pose.t()) {
                poses.set(poses.size() - 1, pose);
                nodes.set(nodes.size() - 1, node);
            } else {
                poses.add(pose);
                nodes.add(node);
            }
        }

        @Override
        public void fix(FixRecord record) {
        }

        @Override
        public void rewoundTo(double tS) {
            throw new IllegalStateException("an ordered log is never rewound");
        }
    }

    /** Membership of times in the gaps, for times that come in ascending order. */
    private static final class GapIndex {
        private final List<TimeSpan> gaps;
        private int next;

        GapIndex(List<TimeSpan> gaps) {
            this.gaps = gaps;
        }

        boolean contains(double t) {
            while (next < gaps.size() && gaps.get(next).endT() <= t) {
                next++;
            }
            return next < gaps.size() && gaps.get(next).startT() < t;
        }
    }
}
