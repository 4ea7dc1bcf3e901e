package org.wayhold.scoring;

import static org.assertj.core.api.Assertions.assertThat;

import java.util.List;
import org.junit.jupiter.api.Test;

/**
 * The plan gives every window it leaves out a reason: past the last fix, before the first, over a real
 * gap, or without enough aided time; a random schedule short of starts says how many. Hand cases on a
 * grid of one second from t = 0: fixes from 5 s to 100 s, a real gap from 40 s to 50 s, the filter
 * not aided long enough before 10 s.
 */
class WindowPlanReasonsTest {

    private static final WindowPlan.Log LOG = new WindowPlan.Log(0.0, 1.0, 121, 5.0, 100.0,
            List.of(new TimeSpan(40.0, 50.0)), k -> k >= 10);

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
        WindowPlan.Log late = new WindowPlan.Log(0.0, 1.0, 121, 0.0, 100.0, List.of(), k -> k >= 25);
        WindowPlan plan = WindowPlan.choose(new WindowPlan.Schedule(new double[] {5}, 0, 10, 0, 0), late, 0);
        assertThat(reasonAt(plan, 10.0, 5)).isEqualTo(UnscoredWindow.Reason.NOT_AIDED_LONG_ENOUGH);
        assertThat(plan.windows()).contains(new OutageWindow(30.0, 5));
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
