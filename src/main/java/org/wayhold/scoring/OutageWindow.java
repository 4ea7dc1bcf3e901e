package org.wayhold.scoring;

/**
 * A simulated outage: GNSS is withheld from {@code startT} for {@code lengthS}.
 *
 * @param startT  start (s, vehicle clock)
 * @param lengthS length (s, > 0)
 */
public record OutageWindow(double startT, double lengthS) {

    public OutageWindow {
        if (!Double.isFinite(startT)) {
            throw new IllegalArgumentException("start: must be a finite time in s, was " + startT);
        }
        if (!(lengthS > 0.0) || Double.isInfinite(lengthS)) {
            throw new IllegalArgumentException("seconds: outage length must be a positive number of s, was " + lengthS);
        }
    }

    public double endT() {
        return startT + lengthS;
    }
}
