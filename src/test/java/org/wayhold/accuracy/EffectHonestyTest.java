package org.wayhold.accuracy;

import static org.assertj.core.api.Assertions.assertThat;

import java.util.EnumMap;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.Scenario;

/**
 * Honesty under sensor effects the filter's model does not share, on one fixed seed per effect (the CI
 * subset of the study {@code EffectStudyMain}, README "Accuracy study"): the simulator's presets, each
 * a drive of the preset's minimum length plus three minutes, replayed with the default configuration.
 *
 * <p>Targets held here: no second with the error above the alert limit while the 95 % radius is within
 * it and the state is not {@code unreliable}; in the canyon, {@code aided} while more than the alert
 * limit off for at most 5 % of the canyon time; at most one window per effect warned late.
 */
class EffectHonestyTest {

    private static final Map<Scenario, EffectStudy.Row> ROWS = new EnumMap<>(Scenario.class);
    private static final List<Scenario> SUBSET = List.of(Scenario.CANYON_BIAS, Scenario.CITY, Scenario.CREEP,
            Scenario.GARAGE, Scenario.LATENCY, Scenario.LEVER_ARM, Scenario.GYRO_SCALE, Scenario.LAUNCH_SLIP);

    @BeforeAll
    static void run() {
        for (Scenario sc : SUBSET) {
            ROWS.put(sc, EffectStudy.run(sc, Settings.defaults(), 1, 1, 10));
        }
    }

    @Test
    void noEffectLeavesThePoseClaimingMoreThanItKnows() {
        ROWS.forEach((sc, r) -> assertThat(r.falseConfidenceS()).as(sc.label()).isZero());
    }

    @Test
    void inTheCanyonThePoseIsRarelyAidedWhileFarOff() {
        for (Scenario sc : List.of(Scenario.CANYON_BIAS, Scenario.CITY)) {
            assertThat(ROWS.get(sc).canyonAidedFar()).as(sc.label()).isLessThanOrEqualTo(0.05);
        }
    }

    @Test
    void windowsTurnUnreliableInTime() {
        ROWS.forEach((sc, r) -> assertThat(r.warnedLate()).as(sc.label()).isLessThanOrEqualTo(1));
    }
}
