package org.wayhold.settings;

/**
 * When a GNSS gap begins, when the estimate stops being usable, and when a vehicle counts as having
 * stopped sending. YAML section {@code outage}.
 *
 * @param gapS        no usable fix for longer than this starts an outage (s)
 * @param alertLimitM 95% horizontal radius above which a pose is {@code unreliable} (m, default 10)
 * @param staleAfterS a vehicle from which the service has received nothing for longer than this, on
 *                    the service's wall clock, is shown as {@code stale} (s, default 10); its navigation
 *                    state stays what the filter last said
 */
public record OutageSettings(double gapS, double alertLimitM, double staleAfterS) {

    public OutageSettings {
        Check.positive("outage.gap_s", gapS);
        Check.positive("outage.alert_limit_m", alertLimitM);
        Check.positive("outage.stale_after_s", staleAfterS);
    }

    /** The same settings with the default stale time, for callers that do not care about it. */
    public OutageSettings(double gapS, double alertLimitM) {
        this(gapS, alertLimitM, DEFAULT_STALE_AFTER_S);
    }

    /**
     * Default stale time (s): a rig posts a batch every second or so, and a dashboard should not flag a
     * vehicle over a few delayed batches; ten seconds of silence means something has stopped (common
     * practice for telemetry heartbeats).
     */
    public static final double DEFAULT_STALE_AFTER_S = 10.0;

    public static OutageSettings defaults() {
        return new OutageSettings(1.5, 10.0, DEFAULT_STALE_AFTER_S);
    }
}
