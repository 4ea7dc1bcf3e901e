package org.wayhold.settings;

/**
 * The bounded pose history of each vehicle, read by {@code ?at=} and track queries. YAML section
 * {@code history}.
 *
 * @param intervalS spacing of stored poses on the vehicle's clock (s); fixes always store a pose
 * @param maxPoses  poses kept per vehicle; the oldest are dropped first (count)
 */
public record HistorySettings(double intervalS, int maxPoses) {

    public HistorySettings {
        Check.positive("history.interval_s", intervalS);
        Check.atLeast("history.max_poses", maxPoses, 1);
    }

    /**
     * 0.2 s and 600 poses: 2 minutes of poses at 5 Hz, which keeps an idle session under 200 KB of
     * heap (about 0.25 KB per pose with its fix; see ServerSettings on max_sessions).
     */
    public static HistorySettings defaults() {
        return new HistorySettings(0.2, 600);
    }
}
