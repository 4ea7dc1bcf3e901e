package org.wayhold.simulate;

/**
 * A half-open interval of time {@code [startT, endT)}, for example a GNSS-denied tunnel passage.
 *
 * @param startT first instant inside the window (seconds on the vehicle's clock)
 * @param endT   first instant after the window (seconds on the vehicle's clock), {@code >= startT}
 */
public record TimeWindow(double startT, double endT) {

    public TimeWindow {
        if (!Double.isFinite(startT)) {
            throw new IllegalArgumentException("startT: must be a finite number of seconds, was " + startT);
        }
        if (!Double.isFinite(endT) || endT < startT) {
            throw new IllegalArgumentException("endT: must be finite seconds >= startT " + startT + ", was " + endT);
        }
    }

    /** Whether {@code t} (seconds) lies in {@code [startT, endT)}. */
    public boolean contains(double t) {
        return t >= startT && t < endT;
    }

    /** Length of the window (seconds). */
    public double durationS() {
        return endT - startT;
    }
}
