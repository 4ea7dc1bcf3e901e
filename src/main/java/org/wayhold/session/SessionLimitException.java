package org.wayhold.session;

/** Thrown when a new vehicle would exceed the configured number of sessions. */
public final class SessionLimitException extends RuntimeException {

    private final int maxSessions;

    /** @param maxSessions the configured bound (count) */
    public SessionLimitException(int maxSessions) {
        super("server.max_sessions: all " + maxSessions + " sessions are in use; delete a vehicle or raise the limit");
        this.maxSessions = maxSessions;
    }

    /** The configured bound (count). */
    public int maxSessions() {
        return maxSessions;
    }
}
