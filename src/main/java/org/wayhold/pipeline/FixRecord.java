package org.wayhold.pipeline;

import org.wayhold.filter.GnssOutcome;

/**
 * A received GNSS fix and what the filter decided on it, for displays that mark raw and gated fixes.
 *
 * @param t        fix time (s, vehicle clock)
 * @param latDeg   WGS-84 latitude (degrees)
 * @param lonDeg   WGS-84 longitude (degrees)
 * @param eastM    east in the session's ENU frame (m)
 * @param northM   north in the session's ENU frame (m)
 * @param sigmaHM  1-sigma horizontal error the filter assumed (m)
 * @param outcome  the filter's decision
 * @param nis      normalised innovation squared (unitless), NaN when not computed
 */
public record FixRecord(double t, double latDeg, double lonDeg, double eastM, double northM, double sigmaHM,
                        GnssOutcome.Kind outcome, double nis) {
}
