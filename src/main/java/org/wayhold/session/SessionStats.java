package org.wayhold.session;

import org.wayhold.filter.FilterCounts;

/**
 * Counters of one vehicle session.
 *
 * @param wheelSpeedApplied wheel-speed samples applied
 * @param yawRateApplied    yaw-rate samples applied
 * @param gnssApplied       GNSS fixes applied (whatever the filter decided on them)
 * @param referenceApplied  reference points received (not used by the filter)
 * @param duplicates        exact duplicates ignored
 * @param orderingRejected  samples rejected as too late or too far ahead
 * @param rewinds           times late samples made the session re-filter
 * @param filter            the filter's running counts: its decisions on fixes, repairs, widenings and resets
 * @param historySize       poses held in the history
 */
public record SessionStats(long wheelSpeedApplied, long yawRateApplied, long gnssApplied, long referenceApplied,
                           long duplicates, long orderingRejected, long rewinds, FilterCounts filter,
                           int historySize) {
}
