package org.wayhold.filter;

import org.wayhold.filter.FilterState.Slot;

import org.wayhold.sample.GnssFix;
import org.wayhold.settings.FilterSettings;
import org.wayhold.settings.VehicleProfile;

/**
 * The height of the vehicle reference point, kept apart from the horizontal state: a scalar random
 * walk corrected by the fixes' heights. Wheel speed and yaw rate say nothing about height, so it
 * needs no coupling to the rest of the state. The antenna sits {@code lever_arm_up_m} above the
 * reference point (the vehicle is taken as level), so a fix's height less that offset observes the
 * reference point.
 */
final class HeightChannel {

    /**
     * Random walk of the height between fixes (m^2/s): a road climbs a few percent, so at motorway
     * speed the height changes by up to about 0.5 m/s (common practice, not a published figure).
     */
    private static final double UP_RANDOM_WALK_M2_PER_S = 0.25;

    /** Vertical GNSS error is commonly about 1.5 times the horizontal one (common practice). */
    private static final double VERTICAL_TO_HORIZONTAL = 1.5;

    private final double floorM;
    private final double leverUpM;

    HeightChannel(FilterSettings settings, VehicleProfile profile) {
        this.floorM = settings.gnssFloorM();
        this.leverUpM = profile.leverArmUpM();
    }

    /** Grows the height's variance over a step of {@code dtS} while the vehicle may move. */
    void predict(FilterState s, double dtS) {
        if (Double.isFinite(s.get(Slot.VAR_UP_M2)) && !s.is(Slot.STANDSTILL)) {
            s.set(Slot.VAR_UP_M2, s.get(Slot.VAR_UP_M2) + (UP_RANDOM_WALK_M2_PER_S * dtS));
        }
    }

    /**
     * Corrects the height with a fix's.
     *
     * @param antennaUpM the fix's height in the session's ENU frame (m), NaN when it has none
     * @param sigmaHM    the fix's horizontal 1-sigma (m), used when it gives no vertical one
     */
    void update(FilterState s, GnssFix fix, double antennaUpM, double sigmaHM) {
        if (Double.isNaN(antennaUpM)) {
            return;
        }
        double fixUpM = antennaUpM - leverUpM;
        double sigmaV = fix.hasSigmaV() ? Math.max(fix.sigmaVM(), floorM) : VERTICAL_TO_HORIZONTAL * sigmaHM;
        double rv = sigmaV * sigmaV;
        if (!Double.isFinite(s.get(Slot.VAR_UP_M2))) {
            s.set(Slot.UP_M, fixUpM);
            s.set(Slot.VAR_UP_M2, rv);
            return;
        }
        double gain = s.get(Slot.VAR_UP_M2) / (s.get(Slot.VAR_UP_M2) + rv);
        s.set(Slot.UP_M, s.get(Slot.UP_M) + (gain * (fixUpM - s.get(Slot.UP_M))));
        s.set(Slot.VAR_UP_M2, (1.0 - gain) * s.get(Slot.VAR_UP_M2));
    }
}
