package org.wayhold.filter;

import org.wayhold.geo.Enu;
import org.wayhold.geo.LocalFrame;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.ReferencePoint;
import org.wayhold.sample.Sample;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;

/**
 * Feeds one sample to a filter: predicts to its time, then holds the input or applies the fix in the
 * session's ENU frame. The live session and the offline scoring share it so both treat samples alike.
 */
public final class SampleFeeder {

    private SampleFeeder() {
    }

    /**
     * @param filter the filter (modified)
     * @param sample the sample; reference points only advance the time
     * @param epochT the session epoch (s, vehicle clock) the filter's times are relative to
     * @param frame  the session's ENU frame; fixes need it
     * @return the decision on a fix, or null for other samples
     */
    public static GnssOutcome feed(NavigationFilter filter, Sample sample, double epochT, LocalFrame frame) {
        filter.predictTo(sample.t() - epochT);
        if (sample instanceof WheelSpeed w) {
            filter.setWheelSpeed(w.speedMps());
        } else if (sample instanceof YawRate y) {
            filter.setYawRate(y.yawRateRadPerS());
        } else if (sample instanceof GnssFix g) {
            if (frame == null) {
                return filter.updateGnss(g, Double.NaN, Double.NaN, Double.NaN);
            }
            double alt = g.hasAlt() ? g.altM() : frame.origin().altM();
            Enu enu = frame.toEnu(g.latDeg(), g.lonDeg(), alt);
            return filter.updateGnss(g, enu.eastM(), enu.northM(), g.hasAlt() ? enu.upM() : Double.NaN);
        } else if (!(sample instanceof ReferencePoint)) {
            throw new IllegalArgumentException("type: unknown sample type " + sample.getClass().getSimpleName());
        }
        return null;
    }
}
