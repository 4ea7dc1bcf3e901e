package org.wayhold.fusion;

import java.util.List;
import org.wayhold.geo.LocalFrame;
import org.wayhold.scoring.TimeSpan;

/**
 * One log fused: its forward track and, when asked for, its smoothed track, point for point at the
 * same times.
 *
 * @param name      the log's name
 * @param frame     the drive's ENU frame (origin at its first fix with a solution)
 * @param forward   the forward filter's track: a point at every fix and every {@code history.interval_s}
 * @param smoothed  the smoothed track at the same times, empty unless smoothing was asked for
 * @param gaps      the log's GNSS gaps (no fix with a solution for longer than {@code outage.gap_s})
 * @param smoothing what the smoother did, null unless smoothing was asked for
 * @param notes     what the reader should know about the input (duplicates, refused samples)
 */
public record FusedDrive(String name, LocalFrame frame, List<FusedPoint> forward, List<FusedPoint> smoothed,
                         List<TimeSpan> gaps, Smoothing smoothing, List<String> notes) {

    public FusedDrive {
        forward = List.copyOf(forward);
        smoothed = List.copyOf(smoothed);
        gaps = List.copyOf(gaps);
        notes = List.copyOf(notes);
    }

    /**
     * What the smoother did on one log.
     *
     * @param nodes              smoothing nodes, one per point (count)
     * @param segments           independent segments (count): one, plus one per cut
     * @param cuts               segments ended by a reset or by a change of the covariance that is no
     *                           added noise (count)
     * @param foldedChanges      widenings of the covariance folded in as process noise (count)
     * @param storeBytes         memory the forward pass was kept in (B)
     * @param pseudoInverseSteps backward steps that needed a pseudo-inverse (count)
     */
    public record Smoothing(int nodes, int segments, int cuts, int foldedChanges, long storeBytes,
                            int pseudoInverseSteps) {
    }
}
