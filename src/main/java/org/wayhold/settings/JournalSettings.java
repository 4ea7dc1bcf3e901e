package org.wayhold.settings;

/**
 * How the journal of accepted samples writes and keeps its files. YAML section {@code journal}.
 *
 * @param fsync             force every group commit to the device before acknowledging (durable);
 *                          false trades durability after a power loss for speed (a process crash
 *                          alone loses nothing either way: written bytes are in the page cache)
 * @param groupCommitMaxS   longest the writer waits to gather more batches into one force (s, >= 0)
 * @param segmentBytes      a segment is closed and a new one started past this size (bytes, >= 4096)
 * @param retentionAgeS     segments older than this and covered by a snapshot are deleted (s of wall time)
 * @param retentionBytes    segments beyond this total size and covered by a snapshot are deleted (bytes)
 * @param snapshotIntervalS spacing of snapshots of all sessions (s of wall time)
 */
public record JournalSettings(boolean fsync, double groupCommitMaxS, long segmentBytes, double retentionAgeS,
                              long retentionBytes, double snapshotIntervalS) {

    /** Smallest segment (bytes): one file-system block, so a segment is never mostly header and metadata. */
    public static final long MIN_SEGMENT_BYTES = 4096;

    public JournalSettings {
        Check.nonNegative("journal.group_commit_max_s", groupCommitMaxS);
        if (segmentBytes < MIN_SEGMENT_BYTES) {
            throw new SettingsException("journal.segment_bytes", "must be at least " + MIN_SEGMENT_BYTES
                    + " bytes, was " + segmentBytes + " bytes");
        }
        Check.positive("journal.retention_age_s", retentionAgeS);
        if (retentionBytes < segmentBytes) {
            throw new SettingsException("journal.retention_bytes", "must be at least journal.segment_bytes ("
                    + segmentBytes + " bytes), was " + retentionBytes + " bytes");
        }
        Check.positive("journal.snapshot_interval_s", snapshotIntervalS);
    }

    /**
     * Durable by default: every acknowledged batch is on the device. A 2 ms group commit lets batches of
     * many vehicles share one force at a cost well below a network round trip; 64 MiB segments, a week
     * and 4 GiB of retention, and a snapshot every 5 minutes bound what a restart replays (common
     * practice for write-ahead logs, no single source).
     */
    public static JournalSettings defaults() {
        return new JournalSettings(true, 0.002, 64L * 1024 * 1024, 7 * 24 * 3600.0, 4L * 1024 * 1024 * 1024,
                300.0);
    }
}
