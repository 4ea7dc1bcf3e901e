package org.wayhold.pose;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.DataInputStream;
import java.io.DataOutputStream;
import java.io.IOException;
import java.util.Arrays;
import java.util.List;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;
import org.wayhold.geo.Geodetic;

/** The bounded pose ring; expected contents are exact hand cases. */
class PoseHistoryTest {

    /** A pose at t whose east coordinate tags it, so replaced and dropped poses can be told apart. */
    static Pose pose(double t, double tagEastM) {
        return new Pose(t, 50.0, 8.0, 100.0, tagEastM, 0.0, 0.0, 90.0, 10.0, 0.0, 1.0, 0.0, 1.0, 1.0,
                Ellipse95.of(1.0, 0.0, 1.0), NavState.AIDED, Outage.NONE, 0.0, 1.0, null, t, 10.0, 2.4477, 0);
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

    /**
     * A pose whose every field is distinct and seeded (NaN in the fields that allow it, every state,
     * active and inactive outages, two origins), so a column mixed up or a bit lost shows.
     */
    private static Pose varied(int i, SplittableRandom rnd, Geodetic originA, Geodetic originB) {
        double[] v = new double[25];
        for (int k = 0; k < v.length; k++) {
            v[k] = rnd.nextDouble(-1e3, 1e3);
        }
        boolean active = i % 3 == 0;
        double semiMinor = Math.abs(v[15]);
        Geodetic origin = i % 7 == 0 ? null : (i % 2 == 0 ? originA : originB);
        return new Pose(1000.0 + 0.2 * i, i % 5 == 0 ? Double.NaN : v[1], v[2], v[3], v[4], v[5], v[6], v[7],
                v[8], v[9], v[10], v[11], v[12], v[13], new Ellipse95(semiMinor + Math.abs(v[14]), semiMinor, v[16]),
                NavState.values()[i % NavState.values().length],
                active ? new Outage(true, v[17], v[18], v[19]) : Outage.NONE, v[20], v[21], origin,
                i % 4 == 0 ? Double.NaN : v[22], v[23], v[24], i % 4096);
    }

    @Test
    void manyPosesGrowTheColumnsWrapAndReadBackEqualAlsoThroughTheBinaryForm() throws IOException {
        // Seeded: 500 poses into 300 slots, past the columns' first size and across the wrap.
        SplittableRandom rnd = new SplittableRandom(8);
        Geodetic a = new Geodetic(51.2734, 10.4468, 310.0);
        Geodetic b = new Geodetic(-33.9, 151.2, 12.0);
        PoseHistory h = new PoseHistory(300);
        Pose[] added = new Pose[500];
        for (int i = 0; i < added.length; i++) {
            added[i] = varied(i, rnd, a, b);
            h.add(added[i]);
        }
        List<Pose> held = h.between(Double.NEGATIVE_INFINITY, Double.POSITIVE_INFINITY);
        // Record equality compares doubles by their bits (Double.compare), so NaN fields count too.
        assertThat(held).containsExactly(Arrays.copyOfRange(added, 200, 500));
        assertThat(h.at(added[250].t() + 0.1).orElseThrow()).isEqualTo(added[250]);

        ByteArrayOutputStream bytes = new ByteArrayOutputStream();
        h.writeTo(new DataOutputStream(bytes));
        PoseHistory back = new PoseHistory(300);
        back.readFrom(new DataInputStream(new ByteArrayInputStream(bytes.toByteArray())));
        assertThat(back.between(Double.NEGATIVE_INFINITY, Double.POSITIVE_INFINITY)).isEqualTo(held);
        ByteArrayOutputStream again = new ByteArrayOutputStream();
        back.writeTo(new DataOutputStream(again));
        assertThat(again.toByteArray()).isEqualTo(bytes.toByteArray());

        // Truncating inside the wrapped ring and adding again keeps the order.
        h.truncateAfter(added[420].t());
        Pose next = varied(600, rnd, a, b);
        h.add(next);
        assertThat(h.size()).isEqualTo(222);
        assertThat(h.newest()).isEqualTo(next);
        assertThat(h.at(added[420].t()).orElseThrow()).isEqualTo(added[420]);
    }
}
