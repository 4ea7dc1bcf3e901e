package org.wayhold.simulate;

import org.wayhold.settings.Check;

/**
 * Longitudinal tyre slip: a tyre transmits force only by slipping, so a driven wheel turns faster than
 * the car moves while it pushes, and a braked wheel slower. The sensed wheel is taken to be on the
 * driven axle.
 *
 * <p>The force per unit mass along the car's forward axis is {@code a + g sin(grade)} (the truth's
 * acceleration along the road plus the slope's pull, g the standard gravity 9.80665 m/s^2). Pushing in
 * the direction of travel, the driven axle carries it, its share {@code drivenLoadFraction} of the
 * weight; braking, all four wheels share it in proportion to their load. Its ratio to the available
 * grip is the utilisation {@code u = F / (mu F_z)}. The brush model with a parabolic contact pressure
 * (H. B. Pacejka, Tire and Vehicle Dynamics, 3rd ed., 2012, ch. 3; from memory) gives
 * {@code u = 1 - (1 - theta sigma)^3} with {@code theta = C / (3 mu)}, C the longitudinal slip stiffness
 * divided by the wheel load and sigma = (V_wheel - v) / V_wheel the theoretical slip; solved for sigma:
 * {@code sigma = 3 mu / C * (1 - (1 - u)^(1/3))}. The wheel's circumferential speed is then
 * {@code v / (1 - sigma)}: over-read under traction, under-read braking. Demands beyond the grip
 * ({@code u >= 1}) read as full sliding, {@code sigma = 3 mu / C}; a real car could not follow them.
 *
 * <p>With the defaults a 4.5 m/s^2 launch uses 85% of the grip and over-reads by 6.7%; ordinary 2 m/s^2
 * starts by 2.0%; braking at 2 m/s^2 under-reads by 1.1%. Near the limit the over-read reaches
 * 3 mu / (C - 3 mu) = 15.6%; softer tyres (lower C) or less grip push it to tens of percent.
 *
 * @param enabled             whether slip is applied
 * @param frictionCoefficient tyre-road friction coefficient mu (unitless, > 0)
 * @param slipStiffness       longitudinal slip stiffness per unit wheel load C (1/unit slip, > 3 mu so that
 *                            full sliding stays below sigma = 1)
 * @param drivenLoadFraction  share of the car's weight on the driven axle (unitless, in (0, 1])
 */
public record WheelSlip(boolean enabled, double frictionCoefficient, double slipStiffness, double drivenLoadFraction) {

    /** Standard gravity (m/s^2; ISO 80000-3, the CGPM's conventional value). */
    static final double STANDARD_GRAVITY_MPS2 = 9.80665;

    /** 0.9: dry asphalt (handbook values 0.8-1.0, common practice). */
    public static final double DEFAULT_FRICTION = 0.9;
    /**
     * 20 per unit slip: a passenger-car tyre's longitudinal stiffness is some 15-25 times its load
     * (from memory); with mu 0.9 the brush model then slides from 13.5% slip, near the 10-20% at which
     * tyres reach peak force (common practice).
     */
    public static final double DEFAULT_SLIP_STIFFNESS = 20.0;
    /** 0.6: a front-engined, front-driven car carries about 60% of its weight on the front axle (common practice). */
    public static final double DEFAULT_DRIVEN_LOAD_FRACTION = 0.6;

    public WheelSlip {
        Check.positive("wheelSpeed.slip.frictionCoefficient", frictionCoefficient, null);
        Check.positive("wheelSpeed.slip.slipStiffness", slipStiffness, null);
        if (!(slipStiffness > 3.0 * frictionCoefficient)) {
            throw new IllegalArgumentException("wheelSpeed.slip.slipStiffness: must exceed 3 * frictionCoefficient = "
                    + 3.0 * frictionCoefficient + " so that full sliding stays below a slip of 1, was " + slipStiffness);
        }
        if (!(drivenLoadFraction > 0.0 && drivenLoadFraction <= 1.0)) {
            throw new IllegalArgumentException("wheelSpeed.slip.drivenLoadFraction: must lie in (0, 1] (unitless), was "
                    + drivenLoadFraction);
        }
    }

    /** Off, with the default magnitudes ready for {@link #on()}. */
    public static WheelSlip off() {
        return new WheelSlip(false, DEFAULT_FRICTION, DEFAULT_SLIP_STIFFNESS, DEFAULT_DRIVEN_LOAD_FRACTION);
    }

    /** The same magnitudes, switched on. */
    public WheelSlip on() {
        return new WheelSlip(true, frictionCoefficient, slipStiffness, drivenLoadFraction);
    }

    /** The same magnitudes, switched on or off. */
    public WheelSlip withEnabled(boolean value) {
        return new WheelSlip(value, frictionCoefficient, slipStiffness, drivenLoadFraction);
    }

    /** This friction coefficient, switched on. */
    public WheelSlip withFrictionCoefficient(double value) {
        return new WheelSlip(true, value, slipStiffness, drivenLoadFraction);
    }

    /** This slip stiffness per unit load, switched on. */
    public WheelSlip withSlipStiffness(double value) {
        return new WheelSlip(true, frictionCoefficient, value, drivenLoadFraction);
    }

    /** This driven-axle load share, switched on. */
    public WheelSlip withDrivenLoadFraction(double value) {
        return new WheelSlip(true, frictionCoefficient, slipStiffness, value);
    }

    /**
     * Theoretical slip in the direction of travel (unitless; positive when the wheel turns faster than
     * the car moves). 0 when off or standing still.
     *
     * @param speedMps   true speed along the road (m/s, signed)
     * @param accelMps2  true acceleration along the road (m/s^2, signed like the speed axis)
     * @param gradeRad   road inclination under the car's forward axis (rad, positive nose up)
     */
    public double travelSlip(double speedMps, double accelMps2, double gradeRad) {
        if (!enabled || speedMps == 0.0) {
            return 0.0;
        }
        double forcePerMass = accelMps2 + STANDARD_GRAVITY_MPS2 * StrictMath.sin(gradeRad);
        double along = Math.signum(speedMps) * forcePerMass;
        double grip = frictionCoefficient * STANDARD_GRAVITY_MPS2 * (along > 0.0 ? drivenLoadFraction : 1.0);
        double u = Math.min(Math.abs(along) / grip, 1.0);
        double sigma = 3.0 * frictionCoefficient / slipStiffness * (1.0 - StrictMath.cbrt(1.0 - u));
        return Math.signum(along) * sigma;
    }
}
