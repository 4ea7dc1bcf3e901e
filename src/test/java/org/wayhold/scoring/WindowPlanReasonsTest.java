package org.wayhold.scoring;

import static org.assertj.core.api.Assertions.assertThat;

import java.util.List;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.SampleType;

/**
 * The plan gives every window it leaves out a reason: past the last fix, before the first, over a real
 * gap in the fixes or an odometry gap, or without enough aided time; a random schedule short of starts
 * says how many. Hand cases on a grid of one second from t = 0: fixes from 5 s to 100 s, a real gap
 * from 40 s to 50 s, the filter not aided long enough before 10 s.
 */
class WindowPlanReasonsTest {

    private static final WindowPlan.Log LOG = new WindowPlan.Log(0.0, 1.0, 121, 5.0, 100.0,
            List.of(new TimeSpan(40.0, 50.0)), List.of(), k -> k >= 10);

    private static UnscoredWindow.Reason reasonAt(WindowPlan plan, double startT, double lengthS) {
        return plan.unscored().stream().filter(u -> u.startT() == startT && u.lengthS() == lengthS)
                .map(UnscoredWindow::reason).findFirst().orElse(null);
    }

    @Test
    void eachLeftOutWindowOfTheFixedScheduleHasItsReason() {
        WindowPlan plan = WindowPlan.choose(new WindowPlan.Schedule(new double[] {10}, 0, 10, 0, 0), LOG, 0);
        // Starts 0, 10, ..., 120: 13 planned windows of 10 s.
        assertThat(plan.windows().size() + plan.skipped()).isEqualTo(13);
        assertThat(reasonAt(plan, 0.0, 10)).isEqualTo(UnscoredWindow.Reason.BEFORE_FIRST_FIX);
        assertThat(plan.windows()).contains(new OutageWindow(10.0, 10), new OutageWindow(20.0, 10));
        // [30, 40] touches the gap's start only: allowed. [40, 50] lies in it.
        assertThat(plan.windows()).contains(new OutageWindow(30.0, 10));
        assertThat(reasonAt(plan, 40.0, 10)).isEqualTo(UnscoredWindow.Reason.OVERLAPS_REAL_GAP);
        assertThat(reasonAt(plan, 100.0, 10)).isEqualTo(UnscoredWindow.Reason.BEYOND_LOG_END);
        assertThat(reasonAt(plan, 120.0, 10)).isEqualTo(UnscoredWindow.Reason.BEYOND_LOG_END);
        assertThat(plan.windows()).contains(new OutageWindow(90.0, 10));
    }

    @Test
    void theAidedTimeIsAReasonOfItsOwn() {
        WindowPlan.Log late = new WindowPlan.Log(0.0, 1.0, 121, 0.0, 100.0, List.of(), List.of(), k -> k >= 25);
        WindowPlan plan = WindowPlan.choose(new WindowPlan.Schedule(new double[] {5}, 0, 10, 0, 0), late, 0);
        assertThat(reasonAt(plan, 10.0, 5)).isEqualTo(UnscoredWindow.Reason.NOT_AIDED_LONG_ENOUGH);
        assertThat(plan.windows()).contains(new OutageWindow(30.0, 5));
    }

    /**
     * An odometry gap from 62.98 s to 66.0 s (a 3 s wheel-speed silence): the 10 s windows at 60 and
     * 65 s lie over it, those at 50 s (ends 60 s) and 70 s do not. Over a real gap as well, a window
     * gives the real gap as its reason (data in the order of the plan: fixes first).
     */
    @Test
    void aWindowOverAnOdometryGapIsLeftOutWithAReasonOfItsOwn() {
        WindowPlan.Log log = new WindowPlan.Log(0.0, 1.0, 121, 5.0, 100.0, List.of(new TimeSpan(40.0, 50.0)),
                List.of(new OdometryGap(SampleType.WHEEL_SPEED, 62.98, 66.0),
                        new OdometryGap(SampleType.YAW_RATE, 44.0, 45.0)), k -> k >= 10);
        WindowPlan plan = WindowPlan.choose(new WindowPlan.Schedule(new double[] {10}, 0, 5, 0, 0), log, 0);
        assertThat(reasonAt(plan, 60.0, 10)).isEqualTo(UnscoredWindow.Reason.OVERLAPS_ODOMETRY_GAP);
        assertThat(reasonAt(plan, 65.0, 10)).isEqualTo(UnscoredWindow.Reason.OVERLAPS_ODOMETRY_GAP);
        assertThat(plan.windows()).contains(new OutageWindow(50.0, 10), new OutageWindow(70.0, 10));
        assertThat(reasonAt(plan, 40.0, 10)).isEqualTo(UnscoredWindow.Reason.OVERLAPS_REAL_GAP);
        assertThat(UnscoredWindow.Reason.OVERLAPS_ODOMETRY_GAP.code()).isEqualTo("overlaps_odometry_gap");
        // A random schedule draws only from starts clear of it.
        WindowPlan random = WindowPlan.choose(new WindowPlan.Schedule(new double[] {10}, 0, 5, 40, 3L), log, 0);
        assertThat(random.windows()).isNotEmpty().noneMatch(w -> w.startT() + 10 > 62.98 && w.startT() < 66.0);
    }

    @Test
    void aRandomScheduleShortOfStartsSaysHowManyWindowsItCouldNotPlace() {
        // A 60 s window must start at 10 s or later (aided) and end by 100 s (last fix), so it starts in
        // [10, 40] s, and every such window overlaps the gap from 40 s to 50 s: no start at all.
        WindowPlan plan = WindowPlan.choose(new WindowPlan.Schedule(new double[] {60}, 0, 10, 3, 7L), LOG, 0);
        assertThat(plan.windows()).isEmpty();
        assertThat(plan.unscored()).singleElement().satisfies(u -> {
            assertThat(u.reason()).isEqualTo(UnscoredWindow.Reason.TOO_FEW_STARTS);
            assertThat(u.count()).isEqualTo(3);
            assertThat(u.startT()).isNaN();
        });
        assertThat(plan.skipped()).isEqualTo(3);
    }
}
