package org.wayhold.sample;

/**
 * A GNSS position fix.
 *
 * @param t         fix time (seconds on the vehicle's clock)
 * @param latDeg    WGS-84 latitude (degrees, [-90, 90])
 * @param lonDeg    WGS-84 longitude (degrees, [-180, 180])
 * @param altM      ellipsoidal height (metres), NaN when not given
 * @param sigmaHM   1-sigma horizontal error along each horizontal axis (metres, >= 0), NaN when not given
 * @param sigmaVM   1-sigma vertical error (metres, >= 0), NaN when not given
 * @param fix       solution kind; {@link FixType#THREE_D} when not given
 * @param sats      satellites used (>= 0), -1 when not given
 * @param hdop      horizontal dilution of precision (unitless, >= 0), NaN when not given
 * @param speedMps  ground speed over the ground (m/s, >= 0), NaN when not given
 * @param courseDeg course over the ground (degrees clockwise from true north), NaN when not given
 */
public record GnssFix(double t, double latDeg, double lonDeg, double altM, double sigmaHM, double sigmaVM,
                      FixType fix, int sats, double hdop, double speedMps, double courseDeg) implements Sample {

    public GnssFix {
        Sample.requireFiniteTime(t);
        if (!(latDeg >= -90.0 && latDeg <= 90.0)) {
            throw new IllegalArgumentException("lat: must be within [-90, 90] degrees, was " + latDeg);
        }
        if (!(lonDeg >= -180.0 && lonDeg <= 180.0)) {
            throw new IllegalArgumentException("lon: must be within [-180, 180] degrees, was " + lonDeg);
        }
        requireOptional("alt", altM, false);
        requireOptional("sigma_h", sigmaHM, true);
        requireOptional("sigma_v", sigmaVM, true);
        requireOptional("hdop", hdop, true);
        requireOptional("speed", speedMps, true);
        requireOptional("course", courseDeg, false);
        if (fix == null) {
            fix = FixType.THREE_D;
        }
        if (sats < -1) {
            throw new IllegalArgumentException("sats: must be a count >= 0, was " + sats);
        }
    }

    /** A plain 3D fix with only a position, as a convenience for tests and simulations. */
    public static GnssFix position(double t, double latDeg, double lonDeg, double sigmaHM) {
        return new GnssFix(t, latDeg, lonDeg, Double.NaN, sigmaHM, Double.NaN, FixType.THREE_D, -1,
                Double.NaN, Double.NaN, Double.NaN);
    }

    private static void requireOptional(String field, double value, boolean nonNegative) {
        if (Double.isNaN(value)) {
            return;
        }
        if (Double.isInfinite(value)) {
            throw new IllegalArgumentException(field + ": must be finite, was " + value);
        }
        if (nonNegative && value < 0.0) {
            throw new IllegalArgumentException(field + ": must not be negative, was " + value);
        }
    }

    public boolean hasAlt() {
        return !Double.isNaN(altM);
    }

    public boolean hasSigmaH() {
        return !Double.isNaN(sigmaHM);
    }

    public boolean hasSigmaV() {
        return !Double.isNaN(sigmaVM);
    }

    public boolean hasHdop() {
        return !Double.isNaN(hdop);
    }

    public boolean hasSats() {
        return sats >= 0;
    }

    public boolean hasSpeed() {
        return !Double.isNaN(speedMps);
    }

    public boolean hasCourse() {
        return !Double.isNaN(courseDeg);
    }

    @Override
    public SampleType type() {
        return SampleType.GNSS;
    }
}
