package org.wayhold.pose;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import java.util.List;
import org.junit.jupiter.api.Test;

/** The bounded pose ring; expected contents are exact hand cases. */
class PoseHistoryTest {

    /** A pose at t whose east coordinate tags it, so replaced and dropped poses can be told apart. */
    static Pose pose(double t, double tagEastM) {
        return new Pose(t, 50.0, 8.0, 100.0, tagEastM, 0.0, 0.0, 90.0, 10.0, 0.0, 1.0, 0.0, 1.0, 1.0,
                Ellipse95.of(1.0, 0.0, 1.0), NavState.AIDED, Outage.NONE, 0.0, 1.0, null, t, 10.0);
    }

    private static List<Double> times(List<Pose> poses) {
        return poses.stream().map(Pose::t).toList();
    }

    @Test
    void ringWrapsDroppingTheOldestFirst() {
        PoseHistory h = new PoseHistory(4);
        for (int i = 0; i < 11; i++) {
            h.add(pose(100.0 + i, i));
        }
        // 11 poses into 4 slots: the last four remain, oldest first.
        assertThat(h.size()).isEqualTo(4);
        assertThat(times(h.between(Double.NEGATIVE_INFINITY, Double.POSITIVE_INFINITY)))
                .containsExactly(107.0, 108.0, 109.0, 110.0);
        assertThat(h.newest().t()).isEqualTo(110.0);
        assertThat(h.at(106.9)).isEmpty();
    }

    @Test
    void atGivesTheNewestPoseAtOrBeforeTheTimeAcrossTheWrap() {
        PoseHistory h = new PoseHistory(5);
        for (int i = 0; i < 8; i++) {
            h.add(pose(1.8e9 + 0.2 * i, i));
        }
        // Held: i = 3..7 (t = 1.8e9 + 0.6 .. 1.4).
        assertThat(h.at(1.8e9 + 0.6).orElseThrow().eastM()).isEqualTo(3.0);
        assertThat(h.at(1.8e9 + 0.7).orElseThrow().eastM()).isEqualTo(3.0);
        assertThat(h.at(1.8e9 + 0.8).orElseThrow().eastM()).isEqualTo(4.0);
        assertThat(h.at(1.8e9 + 100.0).orElseThrow().eastM()).isEqualTo(7.0);
        assertThat(h.at(1.8e9 + 0.5)).isEmpty();
    }

    @Test
    void betweenIsInclusiveAtBothEnds() {
        PoseHistory h = new PoseHistory(3);
        for (int i = 0; i < 7; i++) {
            h.add(pose(i, i));
        }
        assertThat(times(h.between(4.0, 6.0))).containsExactly(4.0, 5.0, 6.0);
        assertThat(times(h.between(4.5, 5.5))).containsExactly(5.0);
        assertThat(times(h.between(5.0, 5.0))).containsExactly(5.0);
        assertThat(h.between(6.5, 9.0)).isEmpty();
        assertThat(h.between(0.0, 3.9)).isEmpty();
    }

    @Test
    void truncateAfterDropsLaterPosesAndTheRingGrowsAgain() {
        PoseHistory h = new PoseHistory(4);
        for (int i = 0; i < 6; i++) {
            h.add(pose(i, i));
        }
        // Held 2, 3, 4, 5 with the ring's start moved: truncate keeps t <= 3.
        h.truncateAfter(3.0);
        assertThat(times(h.between(-1, 99))).containsExactly(2.0, 3.0);
        h.add(pose(3.5, 35));
        h.add(pose(4.5, 45));
        h.add(pose(5.5, 55));
        assertThat(times(h.between(-1, 99))).containsExactly(3.0, 3.5, 4.5, 5.5);
        assertThat(h.at(4.0).orElseThrow().eastM()).isEqualTo(35.0);
        h.truncateAfter(-1.0);
        assertThat(h.isEmpty()).isTrue();
        assertThat(h.at(10.0)).isEmpty();
    }

    @Test
    void aPoseOfTheSameInstantReplacesTheNewestAndAnOlderOneIsRefused() {
        PoseHistory h = new PoseHistory(3);
        h.add(pose(1.0, 1));
        h.add(pose(2.0, 2));
        h.add(pose(2.0, 22));
        assertThat(h.size()).isEqualTo(2);
        assertThat(h.newest().eastM()).isEqualTo(22.0);
        assertThatThrownBy(() -> h.add(pose(1.5, 15))).hasMessageContaining("1.5").hasMessageContaining("older");
        assertThatThrownBy(() -> new PoseHistory(0)).hasMessageContaining("capacity");
    }
}
