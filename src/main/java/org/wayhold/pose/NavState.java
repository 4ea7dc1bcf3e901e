package org.wayhold.pose;

/** How far a pose can be trusted, as the contract names it. */
public enum NavState {
    /** No position and yaw yet. */
    INITIALIZING("initializing"),
    /** Good fixes arrive and correct the estimate. */
    AIDED("aided"),
    /** Fixes arrive but are rejected by gating or are of poor quality. */
    DEGRADED("degraded"),
    /** No usable fix for longer than the gap; the 95% radius is still within the alert limit. */
    BRIDGING("bridging"),
    /** No usable fix and the 95% radius has passed the alert limit. */
    UNRELIABLE("unreliable");

    private final String wireName;

    NavState(String wireName) {
        this.wireName = wireName;
    }

    public String wireName() {
        return wireName;
    }

    public static NavState fromWireName(String name) {
        for (NavState s : values()) {
            if (s.wireName.equals(name)) {
                return s;
            }
        }
        throw new IllegalArgumentException("state: unknown navigation state '" + name + "'");
    }
}
