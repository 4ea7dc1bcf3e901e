package org.wayhold.calibration;

/**
 * One fitted parameter.
 *
 * @param parameter     what was fitted
 * @param configured    the value of the configuration the fit started from
 * @param start         the optimiser's starting value (for constants: the filter's own converged estimate)
 * @param fitted        the maximum-likelihood value (NaN when not fitted)
 * @param standardError 1-sigma from the curvature of the log-likelihood in this parameter alone (same
 *                      unit; NaN when the curvature is not negative or the parameter was not fitted).
 *                      Conditional on the others, so it understates the joint uncertainty
 * @param drop          how much the log-likelihood falls when the estimate is moved by the parameter's
 *                      resolution either way, the smaller of the two (nats; NaN when not fitted); for the
 *                      constants, the quadratic approximation from the filter's 1-sigma,
 *                      (resolution / sigma)^2 / 2
 * @param kept          true when the data supports the estimate and the profile carries it
 * @param note          why it was not kept (empty when kept)
 */
public record Estimate(Parameter parameter, double configured, double start, double fitted, double standardError,
                       double drop, boolean kept, String note) {

    /** The value the profile carries: the estimate when kept, else the configured value. */
    public double value() {
        return kept ? fitted : configured;
    }
}
