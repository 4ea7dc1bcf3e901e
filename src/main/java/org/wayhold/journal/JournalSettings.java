package org.wayhold.journal;

/**
 * How the journal writes and keeps its files.
 *
 * @param fsync             force every group commit to the device before acknowledging (durable);
 *                          false trades durability after a power loss for speed
 * @param groupCommitMaxS   longest a writer waits to gather more batches into one force (s, >= 0)
 * @param segmentBytes      a segment is closed and a new one started past this size (bytes)
 * @param retentionAgeS     segments older than this and covered by a snapshot are deleted (s)
 * @param retentionBytes    segments beyond this total size and covered by a snapshot are deleted (bytes)
 * @param snapshotIntervalS spacing of snapshots of all sessions (s of wall time)
 */
public record JournalSettings(boolean fsync, double groupCommitMaxS, long segmentBytes, double retentionAgeS,
                              long retentionBytes, double snapshotIntervalS) {

    public JournalSettings {
        if (!(groupCommitMaxS >= 0.0) || Double.isInfinite(groupCommitMaxS)) {
            throw new IllegalArgumentException("journal.group_commit_max_s: must be a finite number >= 0, was "
                    + groupCommitMaxS);
        }
        if (segmentBytes < 4096) {
            throw new IllegalArgumentException("journal.segment_bytes: must be at least 4096, was " + segmentBytes);
        }
        if (!(retentionAgeS > 0.0)) {
            throw new IllegalArgumentException("journal.retention_age_s: must be positive, was " + retentionAgeS);
        }
        if (retentionBytes < segmentBytes) {
            throw new IllegalArgumentException("journal.retention_bytes: must be at least segment_bytes ("
                    + segmentBytes + "), was " + retentionBytes);
        }
        if (!(snapshotIntervalS > 0.0) || Double.isInfinite(snapshotIntervalS)) {
            throw new IllegalArgumentException("journal.snapshot_interval_s: must be a positive number, was "
                    + snapshotIntervalS);
        }
    }

    /** Durable by default: every acknowledged batch is on the device. */
    public static JournalSettings defaults() {
        return new JournalSettings(true, 0.002, 64L * 1024 * 1024, 7 * 24 * 3600.0, 4L * 1024 * 1024 * 1024,
                300.0);
    }
}
