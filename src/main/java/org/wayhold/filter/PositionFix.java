package org.wayhold.filter;

import static org.wayhold.filter.StateIndex.EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_NORTH;
import static org.wayhold.filter.StateIndex.NORTH;
import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.YAW;

import java.util.Arrays;
import org.wayhold.settings.VehicleProfile;

/**
 * The measurement model of a GNSS position fix. The antenna sits at the lever arm (forward, left)
 * rotated by the yaw, and the fix also carries the correlated GNSS error:
 * h(x) = (east, north) + R(yaw) (forward, left) + (error east, error north), with R = white variance
 * times the identity.
 */
final class PositionFix {

    private final double leverForwardM;
    private final double leverLeftM;

    PositionFix(VehicleProfile profile) {
        this.leverForwardM = profile.leverArmForwardM();
        this.leverLeftM = profile.leverArmLeftM();
    }

    /**
     * Fills H, R and the innovation of a fix into {@code u}, prepares it, and returns its normalised
     * innovation squared.
     *
     * @param s        the state (not modified)
     * @param u        receives the measurement
     * @param eastM    fix east (m, ENU)
     * @param northM   fix north (m, ENU)
     * @param whiteVar white variance of the fix per axis (m^2)
     */
    double innovation(FilterState s, JosephUpdate u, double eastM, double northM, double whiteVar) {
        double[] x = s.x;
        double[] h = u.h;
        double c = Math.cos(x[YAW]);
        double sn = Math.sin(x[YAW]);
        double fwd = leverForwardM;
        double left = leverLeftM;
        double antEast = x[EAST] + fwd * c - left * sn + x[GNSS_ERR_EAST];
        double antNorth = x[NORTH] + fwd * sn + left * c + x[GNSS_ERR_NORTH];
        Arrays.fill(h, 0.0);
        h[EAST] = 1.0;
        h[YAW] = -fwd * sn - left * c;
        h[GNSS_ERR_EAST] = 1.0;
        h[SIZE + NORTH] = 1.0;
        h[SIZE + YAW] = fwd * c - left * sn;
        h[SIZE + GNSS_ERR_NORTH] = 1.0;
        u.r[0] = whiteVar;
        u.r[1] = 0.0;
        u.r[2] = 0.0;
        u.r[3] = whiteVar;
        u.nu[0] = eastM - antEast;
        u.nu[1] = northM - antNorth;
        u.preparePosition(s.p, h[YAW], h[SIZE + YAW]);
        return u.nis();
    }

    /** The antenna's east offset from the reference point at this yaw (m). */
    double antennaEastOffsetM(double yawRad) {
        return leverForwardM * Math.cos(yawRad) - leverLeftM * Math.sin(yawRad);
    }

    /** The antenna's north offset from the reference point at this yaw (m). */
    double antennaNorthOffsetM(double yawRad) {
        return leverForwardM * Math.sin(yawRad) + leverLeftM * Math.cos(yawRad);
    }
}
