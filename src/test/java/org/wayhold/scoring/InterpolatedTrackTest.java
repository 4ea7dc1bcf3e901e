package org.wayhold.scoring;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;
import static org.assertj.core.api.Assertions.within;

import org.junit.jupiter.api.Test;

class InterpolatedTrackTest {

    private static final double NAN = Double.NaN;

    @Test
    void positionsAreLinearBetweenNeighboursInEnu() {
        InterpolatedTrack t = new InterpolatedTrack(new double[] {10, 11, 12}, new double[] {0, 10, 10},
                new double[] {0, 0, 20}, new double[] {0, 1, 1}, new double[] {NAN, NAN, NAN}, 1.5, true);
        // Exact hand cases: a quarter of the way from (0,0) to (10,0), and half way from (10,0) to (10,20).
        assertThat(t.eastAt(10.25)).isCloseTo(2.5, within(1e-12));
        assertThat(t.northAt(11.5)).isCloseTo(10.0, within(1e-12));
        assertThat(t.upAt(10.5)).isCloseTo(0.5, within(1e-12));
        // Travel east, then north: yaw 0 then pi/2 (counter-clockwise from east).
        assertThat(t.yawAt(10.5)).isCloseTo(0.0, within(1e-12));
        assertThat(t.yawAt(11.5)).isCloseTo(Math.PI / 2, within(1e-12));
    }

    @Test
    void headingsInterpolateAlongTheShorterArc() {
        double a = Math.toRadians(179);
        double b = Math.toRadians(-179);
        InterpolatedTrack t = new InterpolatedTrack(new double[] {0, 1}, new double[] {0, 0}, new double[] {0, 0},
                new double[] {0, 0}, new double[] {a, b}, 2, true);
        assertThat(Math.abs(t.yawAt(0.5))).isCloseTo(Math.PI, within(1e-12));
    }

    @Test
    void pointsFartherApartThanTheLimitDoNotCoverTheTimeBetween() {
        InterpolatedTrack t = new InterpolatedTrack(new double[] {0, 1, 5}, new double[3], new double[3],
                new double[3], new double[] {NAN, NAN, NAN}, 1.5, false);
        assertThat(t.covers(0.5)).isTrue();
        assertThat(t.covers(3)).isFalse();
        assertThat(t.covers(5)).isTrue();
        assertThat(t.covers(5.1)).isFalse();
        assertThat(t.timesWithin(0.5, 5)).containsExactly(1, 5);
        assertThat(t.timesWithin(1.5, 4)).isEmpty();
        assertThatThrownBy(() -> t.eastAt(6)).hasMessageContaining("outside the reference");
    }
}
