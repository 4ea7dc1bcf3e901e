package org.wayhold.scoring;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.wayhold.filter.Reason;
import org.wayhold.pipeline.OrderedLog;
import org.wayhold.pipeline.TrackOutput;
import org.wayhold.pipeline.VehicleTrack;
import org.wayhold.sample.ReferencePoint;
import org.wayhold.sample.Sample;
import org.wayhold.sample.SampleType;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;
import org.wayhold.settings.FilterSettings;
import org.wayhold.settings.Settings;

/**
 * Odometry gaps are found with the filter's own rule for an interrupted stream (DEVELOPERS.md, "The
 * rules the decisions keep": silent for more than three of its usual intervals and more than 0.3 s).
 * The hand cases put readings on exact grids, so the expected gaps follow from that rule by hand; the
 * last test holds the finder against the filter itself on a seeded simulated drive.
 */
class OdometryGapsTest {

    private static final FilterSettings FILTER = Settings.defaults().filter();

    /** Readings of one kind every {@code stepS} from {@code fromT} while before {@code toT}. */
    private static void readings(List<Sample> out, SampleType type, double fromT, double toT, double stepS) {
        for (int k = 0; fromT + k * stepS < toT - 1e-9; k++) {
            double t = fromT + k * stepS;
            out.add(type == SampleType.WHEEL_SPEED ? new WheelSpeed(t, 10.0) : new YawRate(t, 0.01));
        }
    }

    /** The samples in the processing order the survey sees (written here stream by stream, so sorted first). */
    private static List<Sample> inTimeOrder(List<Sample> samples) {
        List<Sample> sorted = new ArrayList<>(samples);
        sorted.sort(java.util.Comparator.comparingDouble(Sample::t));
        return OrderedLog.order(sorted, Settings.defaults().ordering()).samples();
    }

    @Test
    void aFiftyHertzStreamSilentForThreeSecondsIsOneGapFromItsLastReadingToItsNext() {
        List<Sample> log = new ArrayList<>();
        readings(log, SampleType.WHEEL_SPEED, 0.0, 50.0, 0.02);
        readings(log, SampleType.WHEEL_SPEED, 53.0, 100.0, 0.02);
        readings(log, SampleType.YAW_RATE, 0.0, 100.0, 0.01);
        List<OdometryGap> gaps = OdometryGaps.find(inTimeOrder(log), FILTER);
        assertThat(gaps).hasSize(1);
        OdometryGap g = gaps.get(0);
        assertThat(g.stream()).isEqualTo(SampleType.WHEEL_SPEED);
        // The last reading before the silence is at 49.98 s, the first after it at 53.00 s.
        assertThat(g.startT()).isCloseTo(49.98, within(1e-9));
        assertThat(g.endT()).isCloseTo(53.0, within(1e-9));
    }

    @Test
    void theThresholdIsThreeUsualIntervalsButNeverBelowThreeTenthsOfASecond() {
        // 50 Hz: three intervals are 0.06 s, so the 0.3 s floor decides: 0.28 s is no gap, 0.34 s is one.
        List<Sample> fast = new ArrayList<>();
        readings(fast, SampleType.WHEEL_SPEED, 0.0, 10.0, 0.02);
        readings(fast, SampleType.WHEEL_SPEED, 10.26, 20.0, 0.02);
        readings(fast, SampleType.WHEEL_SPEED, 20.32, 30.0, 0.02);
        readings(fast, SampleType.YAW_RATE, 0.0, 30.0, 0.01);
        List<OdometryGap> gaps = OdometryGaps.find(inTimeOrder(fast), FILTER);
        assertThat(gaps).singleElement().satisfies(g -> assertThat(g.startT()).isCloseTo(19.98, within(1e-9)));
        // 2 Hz: three intervals are 1.5 s: 1.4 s between readings (9.5 to 10.9 s) is no gap, 1.6 s (19.9
        // to 21.5 s) is one. Before its
        // second reading a stream has no interval of its own and is judged by the configured rate
        // (filter.gyro_rate_hz, 100 Hz: 0.3 s), as the filter judges it: so [0, 0.5] s is a gap too.
        List<Sample> slow = new ArrayList<>();
        readings(slow, SampleType.YAW_RATE, 0.0, 10.0, 0.5);
        readings(slow, SampleType.YAW_RATE, 10.9, 20.0, 0.5);
        readings(slow, SampleType.YAW_RATE, 21.5, 30.0, 0.5);
        readings(slow, SampleType.WHEEL_SPEED, 0.0, 30.0, 0.02);
        gaps = OdometryGaps.find(inTimeOrder(slow), FILTER);
        assertThat(FILTER.gyroRateHz()).isEqualTo(100.0);
        assertThat(gaps).hasSize(2).allSatisfy(g -> assertThat(g.stream()).isEqualTo(SampleType.YAW_RATE));
        assertThat(gaps.get(0).startT()).isZero();
        assertThat(gaps.get(0).endT()).isEqualTo(0.5);
        assertThat(gaps.get(1).startT()).isCloseTo(19.9, within(1e-9));
        assertThat(gaps.get(1).lengthS()).isCloseTo(1.6, within(1e-9));
    }

    @Test
    void aStreamThatBeginsLateEndsEarlyOrNeverComesLeavesAGap() {
        List<Sample> log = new ArrayList<>();
        readings(log, SampleType.WHEEL_SPEED, 5.0, 60.0, 0.02);
        readings(log, SampleType.YAW_RATE, 0.0, 40.0, 0.01);
        // A reference point stretches the log to 80 s: the wheels' last reading is at 59.98 s, the gyro's
        // at 39.99 s, and the wheels begin 5 s after the log.
        log.add(new ReferencePoint(80.0, 48.0, 11.0, Double.NaN, Double.NaN));
        List<OdometryGap> gaps = OdometryGaps.find(inTimeOrder(log), FILTER);
        assertThat(gaps).hasSize(3);
        assertThat(gaps.get(0)).satisfies(g -> {
            assertThat(g.stream()).isEqualTo(SampleType.WHEEL_SPEED);
            assertThat(g.startT()).isZero();
            assertThat(g.endT()).isEqualTo(5.0);
        });
        assertThat(gaps.get(1)).satisfies(g -> {
            assertThat(g.stream()).isEqualTo(SampleType.YAW_RATE);
            assertThat(g.startT()).isCloseTo(39.99, within(1e-9));
            assertThat(g.endT()).isEqualTo(80.0);
        });
        assertThat(gaps.get(2)).satisfies(g -> {
            assertThat(g.stream()).isEqualTo(SampleType.WHEEL_SPEED);
            assertThat(g.startT()).isCloseTo(59.98, within(1e-9));
            assertThat(g.endT()).isEqualTo(80.0);
        });
        List<Sample> wheelsOnly = new ArrayList<>();
        readings(wheelsOnly, SampleType.WHEEL_SPEED, 0.0, 30.0, 0.02);
        assertThat(OdometryGaps.find(wheelsOnly, FILTER)).singleElement().satisfies(g -> {
            assertThat(g.stream()).isEqualTo(SampleType.YAW_RATE);
            assertThat(g.startT()).isZero();
            assertThat(g.endT()).isCloseTo(29.98, within(1e-9));
        });
    }

    @Test
    void silentSecondsCountTimeWhenBothStreamsAreSilentOnce() {
        List<OdometryGap> gaps = List.of(new OdometryGap(SampleType.WHEEL_SPEED, 10.0, 14.0),
                new OdometryGap(SampleType.YAW_RATE, 12.0, 15.0), new OdometryGap(SampleType.YAW_RATE, 20.0, 21.0));
        // [10, 15] once (5 s) and [20, 21] (1 s), cut to the window [11, 20.5]: 4 s + 0.5 s.
        assertThat(OdometryGaps.silentS(gaps, 11.0, 20.5)).isCloseTo(4.5, within(1e-12));
        assertThat(OdometryGaps.silentS(gaps, 15.0, 20.0)).isZero();
        assertThat(OdometryGaps.anyOverlaps(gaps, 15.0, 20.0)).isFalse();
        assertThat(OdometryGaps.anyOverlaps(gaps, 14.5, 20.0)).isTrue();
    }

    /**
     * The filter's poses say {@code odometry_interrupted} only inside a gap the finder reports, and in
     * every such gap: a seeded simulated drive with the wheel speed cut for 3 s and the yaw rate for 1 s.
     */
    @Test
    void theFilterSaysOdometryInterruptedOnlyInsideTheGapsFoundAndInEachOfThem() {
        List<Sample> drive = SimulatedLogs.drive(4, 17L).samples();
        double t0 = drive.get(0).t();
        List<Sample> cut = new ArrayList<>();
        for (Sample s : drive) {
            double rel = s.t() - t0;
            boolean wheelCut = s instanceof WheelSpeed && rel >= 150.0 && rel < 153.0;
            boolean rateCut = s instanceof YawRate && rel >= 190.0 && rel < 191.0;
            if (!wheelCut && !rateCut) {
                cut.add(s);
            }
        }
        Settings settings = Settings.defaults();
        List<Sample> ordered = inTimeOrder(cut);
        List<OdometryGap> gaps = OdometryGaps.find(ordered, settings.filter());
        assertThat(gaps).extracting(OdometryGap::stream).containsExactly(SampleType.WHEEL_SPEED, SampleType.YAW_RATE);
        assertThat(gaps.get(0).lengthS()).isCloseTo(3.02, within(1e-6));
        assertThat(gaps.get(1).lengthS()).isCloseTo(1.01, within(1e-6));
        VehicleTrack track = new VehicleTrack(settings, settings.profileFor("default"), null, TrackOutput.NONE);
        boolean[] flaggedInside = new boolean[gaps.size()];
        for (Sample s : ordered) {
            if (track.initialized()) {
                track.predictTo(s.t());
                if (Reason.ODOMETRY_INTERRUPTED.in(track.snapshot().reasons())) {
                    int inside = -1;
                    for (int i = 0; i < gaps.size(); i++) {
                        // Up to the first reading after it, which is applied only now.
                        if (s.t() > gaps.get(i).startT() && s.t() <= gaps.get(i).endT()) {
                            inside = i;
                        }
                    }
                    assertThat(inside).as("interrupted at %s s, outside every gap found", s.t() - t0)
                            .isNotNegative();
                    flaggedInside[inside] = true;
                }
            }
            track.apply(s);
        }
        assertThat(flaggedInside).containsOnly(true);
    }
}
