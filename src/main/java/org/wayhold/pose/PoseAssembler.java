package org.wayhold.pose;

import java.util.Optional;
import org.wayhold.filter.FilterSnapshot;
import org.wayhold.filter.GnssOutcome;
import org.wayhold.filter.Reason;
import org.wayhold.geo.Angles;
import org.wayhold.geo.Geodetic;
import org.wayhold.geo.LocalFrame;
import org.wayhold.settings.OutageSettings;

/**
 * Turns a filter snapshot into a pose: navigation state, outage, ellipse, 95% radius, reasons,
 * geodetic position.
 *
 * <p>The state follows the contract: {@code initializing} until a position and a yaw exist;
 * {@code aided} while the last usable fix is at most the gap old, the last fix was not rejected and
 * the fixes agree with the odometry; {@code degraded} while fixes arrive but are rejected, unusable or
 * inconsistent with the odometry; {@code bridging} while no usable fix has come for longer than the
 * gap and the 95% radius ({@link Radius95}) is within the alert limit; {@code unreliable} once that
 * radius passes the alert limit with no usable fix.
 */
public final class PoseAssembler {

    private final OutageSettings outage;

    public PoseAssembler(OutageSettings outage) {
        this.outage = outage;
    }

    /** The navigation state of a snapshot with its 95% radius (m). */
    public NavState classify(FilterSnapshot s, double radius95M) {
        if (!s.initialized()) {
            return NavState.INITIALIZING;
        }
        double sinceUsed = s.tRel() - s.lastUsedFixTRel();
        boolean lastRejected = s.lastOutcome() != null
                && (s.lastOutcome().kind() == GnssOutcome.Kind.GATED
                || s.lastOutcome().kind() == GnssOutcome.Kind.UNUSABLE);
        boolean fixesArriving = s.tRel() - s.lastFixTRel() <= outage.gapS();
        if (sinceUsed <= outage.gapS()) {
            return lastRejected || Reason.FIXES_INCONSISTENT.in(s.reasons()) ? NavState.DEGRADED : NavState.AIDED;
        }
        if (!(radius95M <= outage.alertLimitM())) {
            return NavState.UNRELIABLE;
        }
        return lastRejected && fixesArriving ? NavState.DEGRADED : NavState.BRIDGING;
    }

    /** The navigation state of a snapshot. */
    public NavState classify(FilterSnapshot s) {
        return classify(s, Radius95.of(s.covEastEastM2(), s.covEastNorthM2(), s.covNorthNorthM2()));
    }

    /** The reasons of a snapshot: the filter's, and those of the fixes' arrival. */
    public int reasons(FilterSnapshot s) {
        int r = s.reasons();
        if (!s.initialized()) {
            return r;
        }
        double sinceUsed = s.tRel() - s.lastUsedFixTRel();
        if (sinceUsed > outage.gapS()) {
            r |= Reason.NO_FIX.bit();
        }
        GnssOutcome last = s.lastOutcome();
        if (last != null && s.tRel() - s.lastFixTRel() <= outage.gapS()
                && (last.kind() == GnssOutcome.Kind.GATED || last.kind() == GnssOutcome.Kind.PENDING
                || last.kind() == GnssOutcome.Kind.UNUSABLE)) {
            r |= Reason.FIXES_REJECTED.bit();
        }
        return r;
    }

    /**
     * The geodetic position of the snapshot's ENU position, or empty when it has none: fixes thousands
     * of kilometres from the frame's origin (a receiver reporting 0, 0 while it has no solution, say)
     * can, once they agree with each other, move the estimate so far along the tangent plane that it
     * lies near the centre of the Earth, where geodetic coordinates are not defined. Such a pose keeps
     * its ENU position and reports no latitude and longitude rather than failing the whole batch.
     */
    private static Optional<Geodetic> geodetic(LocalFrame frame, FilterSnapshot s) {
        try {
            return Optional.of(frame.toGeodetic(s.eastM(), s.northM(), s.upM()));
        } catch (IllegalArgumentException e) {
            return Optional.empty();
        }
    }

    /**
     * Builds the pose of a snapshot.
     *
     * @param s      the filter's snapshot
     * @param epochT the session epoch (s, vehicle clock) that the snapshot's times are relative to
     * @param frame  the session's ENU frame, null before the first fix
     */
    public Pose assemble(FilterSnapshot s, double epochT, LocalFrame frame) {
        Ellipse95 ellipse = Ellipse95.of(s.covEastEastM2(), s.covEastNorthM2(), s.covNorthNorthM2());
        double radius = Radius95.of(s.covEastEastM2(), s.covEastNorthM2(), s.covNorthNorthM2());
        NavState state = classify(s, radius);
        Outage out = Outage.NONE;
        if (s.initialized() && s.tRel() - s.lastUsedFixTRel() > outage.gapS()) {
            out = new Outage(true, epochT + s.lastUsedFixTRel(), s.tRel() - s.lastUsedFixTRel(),
                    s.odometerM() - s.odometerAtLastUsedFixM());
        }
        double lat = Double.NaN;
        double lon = Double.NaN;
        double alt = Double.NaN;
        Geodetic origin = null;
        if (frame != null) {
            origin = frame.origin();
            Optional<Geodetic> g = geodetic(frame, s);
            if (g.isPresent()) {
                lat = g.get().latDeg();
                lon = g.get().lonDeg();
                alt = g.get().altM();
            }
        }
        double headingSigmaDeg = Math.toDegrees(Math.sqrt(Math.max(s.varYawRad2(), 0.0)));
        double headingDeg = s.initialized() ? Angles.yawRadToHeadingDeg(s.yawRad()) : Double.NaN;
        return new Pose(epochT + s.tRel(), lat, lon, alt, s.eastM(), s.northM(), s.upM(), headingDeg,
                s.speedMps(), s.yawRateRadPerS(), s.covEastEastM2(), s.covEastNorthM2(), s.covNorthNorthM2(),
                s.initialized() ? headingSigmaDeg : Double.NaN, ellipse, state, out, s.gyroBiasRadPerS(),
                s.speedScale(), origin, epochT + s.lastUsedFixTRel(), outage.alertLimitM(), radius, reasons(s));
    }
}
