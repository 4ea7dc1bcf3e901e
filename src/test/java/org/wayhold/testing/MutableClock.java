package org.wayhold.testing;

import java.time.Clock;
import java.time.Instant;
import java.time.ZoneId;
import java.time.ZoneOffset;
import java.util.concurrent.atomic.AtomicLong;

/** A wall clock that tests move by hand (milliseconds), so that staleness needs no waiting. */
public final class MutableClock extends Clock {

    private final AtomicLong millis;

    /** @param startMillis the clock's first reading (ms since the epoch) */
    public MutableClock(long startMillis) {
        this.millis = new AtomicLong(startMillis);
    }

    /** Moves the clock on by {@code seconds} (may be fractional). */
    public void advanceS(double seconds) {
        millis.addAndGet(Math.round(seconds * 1000.0));
    }

    @Override
    public long millis() {
        return millis.get();
    }

    @Override
    public Instant instant() {
        return Instant.ofEpochMilli(millis.get());
    }

    @Override
    public ZoneId getZone() {
        return ZoneOffset.UTC;
    }

    @Override
    public Clock withZone(ZoneId zone) {
        throw new UnsupportedOperationException("zone: this test clock is UTC only");
    }
}
