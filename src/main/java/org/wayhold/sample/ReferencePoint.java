package org.wayhold.sample;

/**
 * A point of a trusted reference trajectory. Used only for scoring; never fed to the filter.
 *
 * @param t          sample time (seconds on the vehicle's clock)
 * @param latDeg     WGS-84 latitude (degrees, [-90, 90])
 * @param lonDeg     WGS-84 longitude (degrees, [-180, 180])
 * @param altM       ellipsoidal height (metres), NaN when not given
 * @param headingDeg heading (degrees clockwise from true north), NaN when not given
 */
public record ReferencePoint(double t, double latDeg, double lonDeg, double altM, double headingDeg)
        implements Sample {

    public ReferencePoint {
        Sample.requireFiniteTime(t);
        if (!(latDeg >= -90.0 && latDeg <= 90.0)) {
            throw new IllegalArgumentException("lat: must be within [-90, 90] degrees, was " + latDeg);
        }
        if (!(lonDeg >= -180.0 && lonDeg <= 180.0)) {
            throw new IllegalArgumentException("lon: must be within [-180, 180] degrees, was " + lonDeg);
        }
        if (Double.isInfinite(altM)) {
            throw new IllegalArgumentException("alt: must be finite, was " + altM);
        }
        if (Double.isInfinite(headingDeg)) {
            throw new IllegalArgumentException("heading: must be finite, was " + headingDeg);
        }
    }

    public boolean hasAlt() {
        return !Double.isNaN(altM);
    }

    public boolean hasHeading() {
        return !Double.isNaN(headingDeg);
    }

    @Override
    public SampleType type() {
        return SampleType.REFERENCE;
    }
}
