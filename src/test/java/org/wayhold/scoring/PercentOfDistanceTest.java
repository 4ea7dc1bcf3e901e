package org.wayhold.scoring;

import static org.assertj.core.api.Assertions.assertThat;

import java.util.List;
import org.junit.jupiter.api.Test;

/**
 * The error as a percentage of the distance is shown only for windows of at least
 * {@link WindowScore#MIN_DISTANCE_FOR_PCT_M} driven: over a standstill a 0.5 m error would be 500 % of
 * a 0.1 m crawl. Hand cases: the percentages below are error / distance x 100 by hand.
 */
class PercentOfDistanceTest {

    private static WindowScore window(double startT, double distanceM, double finalErrorM) {
        return new WindowScore(new OutageWindow(startT, 30), distanceM, finalErrorM, finalErrorM,
                distanceM > 0 ? 100.0 * finalErrorM / distanceM : Double.NaN, 1.0, 2.0, 2.0, Double.NaN, Double.NaN,
                false, 0, 0, 0, 0, 301, startT + 30, 0, 0, 0, 0);
    }

    @Test
    void shortWindowsGiveNoPercentageAndAreLeftOutOfItsStatistics() {
        WindowScore crawl = window(0, 0.1, 0.5);
        WindowScore edge = window(100, WindowScore.MIN_DISTANCE_FOR_PCT_M, 1.0);
        WindowScore drive = window(200, 400.0, 2.0);
        assertThat(crawl.errorPct()).isEqualTo(500.0);
        assertThat(crawl.shownErrorPct()).isNaN();
        assertThat(edge.shownErrorPct()).isEqualTo(2.0);
        assertThat(drive.shownErrorPct()).isEqualTo(0.5);
        LengthSummary s = LengthSummary.of(30, List.of(crawl, edge, drive));
        assertThat(s.count()).isEqualTo(3);
        assertThat(s.pctCount()).isEqualTo(2);
        // Median of 2.0 and 0.5 (R-7: halfway between the two order statistics).
        assertThat(s.medianErrorPct()).isEqualTo(1.25);
        // The final error figures still count every window.
        assertThat(s.medianFinalErrorM()).isEqualTo(1.0);
    }
}
