package org.wayhold.scoring;

/**
 * A stretch of time.
 *
 * @param startT start (s, vehicle clock)
 * @param endT   end (s, vehicle clock, not before the start)
 */
public record TimeSpan(double startT, double endT) {

    public TimeSpan {
        if (!Double.isFinite(startT) || !Double.isFinite(endT) || endT < startT) {
            throw new IllegalArgumentException("span: start and end must be finite times in s with end >= start, were "
                    + startT + " and " + endT);
        }
    }

    /** Length (s). */
    public double lengthS() {
        return endT - startT;
    }

    /** True when this span and {@code [fromT, toT]} share more than an end point. */
    public boolean overlaps(double fromT, double toT) {
        return fromT < endT && startT < toT;
    }
}
