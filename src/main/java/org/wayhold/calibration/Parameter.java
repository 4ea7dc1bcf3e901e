package org.wayhold.calibration;

/**
 * What {@link Calibration} fits (the noise by likelihood, the constants as filter states), with the
 * bounds it searches and the change it must be able to tell apart.
 *
 * <p>Noise parameters are searched on the log of their value (they are positive and span orders of
 * magnitude); constants on their value. The optimiser works on value / {@link #unit()} (or the log),
 * so that one trust-region radius suits every coordinate.
 *
 * <p>{@link #resolution()} is the change the data must be able to tell apart for an estimate to be
 * kept: a factor of 1.5 for noise densities; 20 ms of latency, 0.3 m of lever arm, 0.2 % of odometer
 * scale and 0.3 % of gyro scale (the project's calibration targets). A noise estimate is kept when moving
 * it by that much either way lowers the log-likelihood by at least {@link Calibration#SUPPORT_DROP}; a
 * constant when the filter's 1-sigma of it is below resolution / 1.96, the same 95 % criterion.
 */
public enum Parameter {
    /** White part of the GNSS horizontal error per axis, at a typical fix (m). */
    GNSS_WHITE_M("GNSS white error per axis", "m", true, 0.02, 30.0, 1.0, 1.5),
    /** Stationary 1-sigma of the correlated (Gauss-Markov) GNSS error per axis, at a typical fix (m). */
    GNSS_CORRELATED_M("GNSS correlated error per axis", "m", true, 0.02, 30.0, 1.0, 1.5),
    /** Correlation time of the Gauss-Markov GNSS error (s). */
    GNSS_CORRELATION_TIME_S("GNSS error correlation time", "s", true, 2.0, 2000.0, 1.0, 1.5),
    /** Random walk of the gyro bias (rad/s per sqrt(s)). */
    GYRO_BIAS_WALK("gyro bias random walk", "rad/s/sqrt(s)", true, 1e-8, 1e-2, 1.0, 1.5),
    /** Random walk of the wheel-speed scale (1 per sqrt(s)). */
    SPEED_SCALE_WALK("odometer scale random walk", "1/sqrt(s)", true, 1e-9, 1e-3, 1.0, 1.5),
    /** Random walk of the gyro scale (1 per sqrt(s)). */
    GYRO_SCALE_WALK("gyro scale random walk", "1/sqrt(s)", true, 1e-9, 1e-3, 1.0, 1.5),
    /** Time from a fix's time of validity to its stamp (s). */
    GNSS_LATENCY_S("GNSS latency", "s", false, -0.5, 0.5, 0.05, 0.02),
    /** GNSS antenna ahead of the reference point (m). */
    LEVER_FORWARD_M("antenna forward", "m", false, -5.0, 5.0, 0.5, 0.3),
    /** GNSS antenna left of the reference point (m). */
    LEVER_LEFT_M("antenna left", "m", false, -5.0, 5.0, 0.5, 0.3),
    /** Wheel-speed scale: true speed = scale x reading (unitless). */
    SPEED_SCALE("odometer scale", "", false, 0.8, 1.25, 0.005, 0.002),
    /** Gyro scale: true rate = scale x (reading - bias) (unitless). */
    GYRO_SCALE("gyro scale", "", false, 0.8, 1.25, 0.005, 0.003);

    private final String label;
    private final String unitName;
    private final boolean logScale;
    private final double lower;
    private final double upper;
    private final double unit;
    private final double resolution;

    Parameter(String label, String unitName, boolean logScale, double lower, double upper, double unit,
              double resolution) {
        this.label = label;
        this.unitName = unitName;
        this.logScale = logScale;
        this.lower = lower;
        this.upper = upper;
        this.unit = unit;
        this.resolution = resolution;
    }

    /** Words for reports. */
    public String label() {
        return label;
    }

    /** The unit of the value, for reports ("" when unitless). */
    public String unitName() {
        return unitName;
    }

    /** True for noise parameters, searched on the log of their value. */
    public boolean logScale() {
        return logScale;
    }

    /** True for the vehicle constants (also filter states), false for noise parameters. */
    public boolean constant() {
        return !logScale;
    }

    /** Smallest value searched. */
    public double lower() {
        return lower;
    }

    /** Largest value searched. */
    public double upper() {
        return upper;
    }

    /**
     * The change the data must tell apart: a factor for noise parameters, an amount in the value's unit
     * for constants.
     */
    public double resolution() {
        return resolution;
    }

    /** The optimiser's coordinate of a value. */
    double toCoordinate(double value) {
        double v = Math.min(Math.max(value, lower), upper);
        return logScale ? Math.log(v) : v / unit;
    }

    /** The value of an optimiser's coordinate. */
    double fromCoordinate(double coordinate) {
        return logScale ? Math.exp(coordinate) : coordinate * unit;
    }

    /** The optimiser's bounds. */
    double lowerCoordinate() {
        return toCoordinate(lower);
    }

    double upperCoordinate() {
        return toCoordinate(upper);
    }

    /** The value moved by the resolution, up (+1) or down (-1), kept inside the bounds. */
    double moved(double value, int direction) {
        double v = logScale ? value * Math.pow(resolution, direction) : value + direction * resolution;
        return Math.min(Math.max(v, lower), upper);
    }
}
