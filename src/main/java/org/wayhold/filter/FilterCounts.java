package org.wayhold.filter;

/**
 * Running counts of what the filter decided, for metrics and reports.
 *
 * @param fixesUsed          fixes that initialised or corrected the state
 * @param fixesGated         fixes that failed the chi-square gate
 * @param fixesPending       fixes held back while waiting for agreement after a gap
 * @param fixesDropped       held-back fixes that never found agreement
 * @param fixesUnusable      fixes without a solution
 * @param velocityGated      GNSS speed/course pairs that failed their gate
 * @param covarianceRepairs  times the covariance had to be made positive definite again
 * @param resets             times position and yaw were started afresh because fixes that agreed with
 *                           each other lay far outside the covariance
 */
public record FilterCounts(long fixesUsed, long fixesGated, long fixesPending, long fixesDropped,
                           long fixesUnusable, long velocityGated, long covarianceRepairs, long resets) {
}
