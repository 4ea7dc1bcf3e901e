package org.wayhold.session;

/**
 * Whether a vehicle is still sending, judged on the service's wall clock (never on the vehicle's own
 * clock, which a replayed or delayed drive may hold at any date).
 *
 * @param receivedAtS when the latest accepted sample of the vehicle arrived (s, UTC epoch seconds of the
 *                    service's clock); NaN when none has arrived since this process holds the session
 *                    (a session restored from the journal, say)
 * @param silentS     wall-clock time since that arrival, or since the session was created or restored
 *                    when nothing has arrived (s, >= 0)
 * @param stale       true when {@code silentS} is longer than {@code outage.stale_after_s}
 */
public record Liveness(double receivedAtS, double silentS, boolean stale) {

    public Liveness {
        if (!(silentS >= 0.0)) {
            throw new IllegalArgumentException("silentS: must be a non-negative number of s, was " + silentS);
        }
    }

    /**
     * Judges staleness.
     *
     * @param receivedAtMillis latest arrival (ms since the epoch), or {@link Long#MIN_VALUE} when none
     * @param sinceMillis      arrival, or creation of the session when nothing arrived (ms since the epoch)
     * @param nowMillis        the wall clock now (ms since the epoch)
     * @param staleAfterS      {@code outage.stale_after_s} (s)
     */
    public static Liveness of(long receivedAtMillis, long sinceMillis, long nowMillis, double staleAfterS) {
        double silent = Math.max(0L, nowMillis - sinceMillis) / 1000.0;
        double receivedAt = receivedAtMillis == Long.MIN_VALUE ? Double.NaN : receivedAtMillis / 1000.0;
        return new Liveness(receivedAt, silent, silent > staleAfterS);
    }
}
