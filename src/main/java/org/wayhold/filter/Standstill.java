package org.wayhold.filter;

import org.wayhold.filter.FilterState.Slot;
import org.wayhold.settings.FilterSettings;

/**
 * Decides whether the vehicle stands still or creeps when its wheels read zero.
 *
 * <p>Wheel-speed sensors count teeth and read zero below a fraction of a metre per second, so zero
 * wheels do not prove a standstill. Once they have read zero for {@code filter.standstill_after_s},
 * each yaw-rate reading is tested against the gyro bias (the zero-rate update's normalised innovation
 * squared against the 1-dof chi-square quantile): a reading the bias explains confirms the standstill,
 * the yaw is held and the reading calibrates the bias; a reading it cannot explain means the vehicle
 * turns, so it moves: it creeps, the yaw rate is integrated, and the reading never reaches the bias.
 * A vehicle stays creeping until the gyro has been quiet for {@code standstill_after_s}.
 *
 * <p>A creeping vehicle moves at a speed the wheels cannot measure, at most
 * {@code filter.wheel_speed_zero_below_mps}, and, since it turns at omega on a radius of at least
 * {@code filter.min_turn_radius_m}, at least omega times that radius: {@link #creepSpeedMps} takes the
 * middle of that range, and {@link ProcessNoise} its spread.
 */
final class Standstill {

    /** Wheel speeds below this magnitude count as zero (m/s): quantised sensors report exactly 0. */
    static final double ZERO_SPEED_MPS = 1e-3;

    /** 1-dof chi-square quantile at 0.999 (NIST/SEMATECH e-Handbook 1.3.6.7.4: 10.828). */
    static final double REST_GATE = 10.827566170662733;

    private final double afterS;
    private final double zeroBelowMps;
    private final double minTurnRadiusM;

    Standstill(FilterSettings settings) {
        this.afterS = settings.standstillAfterS();
        this.zeroBelowMps = settings.wheelSpeedZeroBelowMps();
        this.minTurnRadiusM = settings.minTurnRadiusM();
    }

    /** Updates the decision after a wheel-speed reading was recorded. */
    void onWheelSpeed(FilterState s) {
        double wheel = s.get(Slot.WHEEL_SPEED_MPS);
        double t = s.get(Slot.T_REL);
        if (Math.abs(wheel) < ZERO_SPEED_MPS) {
            if (Double.isNaN(s.get(Slot.ZERO_SPEED_SINCE_T_REL))) {
                s.set(Slot.ZERO_SPEED_SINCE_T_REL, t);
            }
            if (!atRestLongEnough(s)) {
                s.set(Slot.STANDSTILL, false);
            } else if (!s.is(Slot.HAS_YAW_RATE) || !s.is(Slot.INITIALIZED)) {
                // No gyro (or no bias yet) to contradict the wheels.
                s.set(Slot.STANDSTILL, true);
            }
        } else {
            s.set(Slot.ZERO_SPEED_SINCE_T_REL, Double.NaN);
            s.set(Slot.STANDSTILL, false);
            s.set(Slot.CREEPING, false);
            s.set(Slot.LAST_MOVING_SIGN, Math.signum(wheel));
        }
    }

    /**
     * Decides on a yaw-rate reading (recorded) while the wheels may read zero.
     *
     * @param zeroRateNis the reading's NIS as a zero-rate measurement of the bias, NaN when the filter
     *                    has no bias yet
     * @return true when the reading should correct the bias (a confirmed standstill)
     */
    boolean onYawRate(FilterState s, double zeroRateNis) {
        boolean wheelsZero = Math.abs(s.get(Slot.WHEEL_SPEED_MPS)) < ZERO_SPEED_MPS
                && !Double.isNaN(s.get(Slot.ZERO_SPEED_SINCE_T_REL));
        if (!wheelsZero) {
            s.set(Slot.STANDSTILL, false);
            s.set(Slot.CREEPING, false);
            return false;
        }
        if (!atRestLongEnough(s)) {
            return false;
        }
        if (Double.isNaN(zeroRateNis)) {
            s.set(Slot.STANDSTILL, true);
            return false;
        }
        double t = s.get(Slot.T_REL);
        if (zeroRateNis > REST_GATE) {
            s.set(Slot.LAST_TURN_AT_REST_T_REL, t);
            s.set(Slot.CREEPING, true);
            s.set(Slot.STANDSTILL, false);
            return false;
        }
        if (s.is(Slot.CREEPING) && t - s.get(Slot.LAST_TURN_AT_REST_T_REL) < afterS) {
            return false;
        }
        s.set(Slot.CREEPING, false);
        s.set(Slot.STANDSTILL, true);
        return true;
    }

    private boolean atRestLongEnough(FilterState s) {
        return s.get(Slot.T_REL) - s.get(Slot.ZERO_SPEED_SINCE_T_REL) >= afterS;
    }

    /** The speed of a vehicle creeping at turn rate {@code omegaRadPerS} (m/s, unsigned). */
    double creepSpeedMps(double omegaRadPerS) {
        double low = Math.min(Math.abs(omegaRadPerS) * minTurnRadiusM, zeroBelowMps);
        return 0.5 * (low + zeroBelowMps);
    }

    /**
     * 1-sigma of that speed (m/s): a speed anywhere between its two bounds, uniform, has a spread of
     * (high - low) / sqrt(12).
     */
    double creepSpeedSigmaMps(double omegaRadPerS) {
        double low = Math.min(Math.abs(omegaRadPerS) * minTurnRadiusM, zeroBelowMps);
        return (zeroBelowMps - low) / Math.sqrt(12.0);
    }
}
