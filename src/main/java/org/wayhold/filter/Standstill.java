package org.wayhold.filter;

import org.wayhold.filter.FilterState.Slot;

import org.wayhold.settings.FilterSettings;

/**
 * Decides when the vehicle stands still: the wheel speed has read zero for at least
 * {@code filter.standstill_after_s}. While it stands, the yaw is held and each yaw-rate reading
 * observes the gyro bias ({@link ZeroRate}).
 */
final class Standstill {

    /** Wheel speeds below this magnitude count as zero (m/s): quantised sensors report exactly 0. */
    static final double ZERO_SPEED_MPS = 1e-3;

    private final double afterS;

    Standstill(FilterSettings settings) {
        this.afterS = settings.standstillAfterS();
    }

    /** Updates the decision after a wheel-speed reading was recorded. */
    void onWheelSpeed(FilterState s) {
        if (Math.abs(s.get(Slot.WHEEL_SPEED_MPS)) < ZERO_SPEED_MPS) {
            if (Double.isNaN(s.get(Slot.ZERO_SPEED_SINCE_T_REL))) {
                s.set(Slot.ZERO_SPEED_SINCE_T_REL, s.get(Slot.T_REL));
            }
            s.set(Slot.STANDSTILL, s.get(Slot.T_REL) - s.get(Slot.ZERO_SPEED_SINCE_T_REL) >= afterS);
        } else {
            s.set(Slot.ZERO_SPEED_SINCE_T_REL, Double.NaN);
            s.set(Slot.STANDSTILL, false);
        }
    }

    /**
     * Updates the decision after a yaw-rate reading was recorded: the standstill time is re-checked
     * here too, as the wheel-speed stream may be slower.
     */
    void onYawRate(FilterState s) {
        if (Math.abs(s.get(Slot.WHEEL_SPEED_MPS)) < ZERO_SPEED_MPS && !Double.isNaN(s.get(Slot.ZERO_SPEED_SINCE_T_REL))) {
            s.set(Slot.STANDSTILL, s.get(Slot.T_REL) - s.get(Slot.ZERO_SPEED_SINCE_T_REL) >= afterS);
        }
    }
}
