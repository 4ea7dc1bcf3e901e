package org.wayhold.settings;

/**
 * When a GNSS gap begins and when the estimate stops being usable. YAML section {@code outage}.
 *
 * @param gapS        no usable fix for longer than this starts an outage (s)
 * @param alertLimitM 95% horizontal radius above which a pose is {@code unreliable} (m, default 10)
 */
public record OutageSettings(double gapS, double alertLimitM) {

    public OutageSettings {
        Check.positive("outage.gap_s", gapS);
        Check.positive("outage.alert_limit_m", alertLimitM);
    }

    public static OutageSettings defaults() {
        return new OutageSettings(1.5, 10.0);
    }
}
