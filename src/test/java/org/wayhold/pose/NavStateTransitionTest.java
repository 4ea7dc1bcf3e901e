package org.wayhold.pose;

import static org.assertj.core.api.Assertions.assertThat;

import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.FixType;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.session.SyntheticDrive;
import org.wayhold.session.VehicleSession;
import org.wayhold.settings.GatingSettings;
import org.wayhold.settings.Settings;

/**
 * The navigation state machine on a scripted drive, checked against the definitions of the states in
 * README.md ("Conventions", navigation states) and openapi.yaml (schema {@code Pose}, {@code state}):
 * <ul>
 *   <li>{@code initializing} until the first accepted fix and a heading;</li>
 *   <li>{@code aided} while good fixes arrive;</li>
 *   <li>{@code degraded} while fixes arrive but are rejected by gating or are of poor quality;</li>
 *   <li>{@code bridging} while no usable fix has arrived for longer than the configured gap (1.5 s by
 *       default) and the 95% horizontal radius (the circular R95 of the covariance) is within the alert
 *       limit (10 m by default);</li>
 *   <li>{@code unreliable} once that radius passes the alert limit with no fix.</li>
 * </ul>
 * Script (times from the start): fixes without course at first, so the heading needs 5 m of
 * displacement; a fix 60 m off at 20 s; a fix without a solution at 30 s; no fixes from 60 s to 420 s;
 * fixes again after that (three must agree over a second before one is used: set explicitly below).
 */
class NavStateTransitionTest {

    private static final double T0 = 1.8e9;
    private static final double OUTAGE_FROM_S = 60.0;
    private static final double OUTAGE_TO_S = 420.0;

    @Test
    void scriptedDriveWalksThroughEveryStateAsTheContractDefinesThem() {
        // Gate at 1 - 1e-9 (threshold 41.4) instead of the default 0.999, so that over the ~2000 fixes of
        // the script only the planted fault is gated, not the one-in-a-thousand honest fix the default
        // gate rejects by design. Reacquisition after the gap needs 3 agreeing fixes (stated here rather
        // than taken from the default, so the script's expectations do not move with it). Everything
        // else is the default.
        Settings d = Settings.defaults();
        Settings settings = new Settings(d.server(), d.filter(), new GatingSettings(1.0 - 1e-9, 3, 1.0), d.outage(),
                d.ordering(), d.history(), java.util.Map.of());
        double gapS = settings.outage().gapS();
        double alertM = settings.outage().alertLimitM();
        List<Sample> drive = script();
        VehicleSession session = new VehicleSession("car-7", settings, null);
        List<Pose> poses = new ArrayList<>();
        session.addListener(poses::add);
        for (Sample s : drive) {
            session.submit(List.of(s));
        }

        // Times of the fixes that the filter could use (a solution and not the planted outlier).
        List<Double> goodFixTimes = drive.stream().filter(s -> s instanceof GnssFix g && g.fix() != FixType.NONE
                && g.sigmaHM() != 1.01).map(Sample::t).toList();
        double lastFixBeforeOutage = goodFixTimes.stream().filter(t -> t < T0 + OUTAGE_FROM_S)
                .reduce((a, b) -> b).orElseThrow();

        List<NavState> sequence = new ArrayList<>();
        for (Pose p : poses) {
            if (sequence.isEmpty() || sequence.get(sequence.size() - 1) != p.state()) {
                sequence.add(p.state());
            }
        }
        assertThat(sequence).containsExactly(NavState.INITIALIZING, NavState.AIDED, NavState.DEGRADED,
                NavState.AIDED, NavState.DEGRADED, NavState.AIDED, NavState.BRIDGING, NavState.UNRELIABLE,
                NavState.AIDED);

        for (int i = 0; i < poses.size(); i++) {
            Pose p = poses.get(i);
            double rel = p.t() - T0;
            if (rel > OUTAGE_FROM_S && rel < OUTAGE_TO_S) {
                // Inside the gap: aided up to the gap length after the last fix, then bridging while the
                // radius is within the limit, unreliable beyond it.
                double since = p.t() - lastFixBeforeOutage;
                NavState expected = since <= gapS ? NavState.AIDED
                        : p.radius95M() > alertM ? NavState.UNRELIABLE : NavState.BRIDGING;
                assertThat(p.state()).as("pose at %.2f s, %.2f s after the last fix, radius %.3f m", rel, since,
                        p.radius95M()).isEqualTo(expected);
                assertThat(p.outage().active()).isEqualTo(since > gapS);
                if (since > gapS) {
                    assertThat(p.outage().sinceT()).isEqualTo(lastFixBeforeOutage);
                    assertThat(p.outage().seconds()).isCloseTo(since, org.assertj.core.api.Assertions.within(1e-6));
                    assertThat(p.outage().meters()).isGreaterThan(10.0 * (since - 0.01));
                }
            }
        }
        // The pose stored for a fix is the last one of its instant (inputs of the same time come first).
        double outlierT = drive.stream().filter(x -> x instanceof GnssFix g && g.sigmaHM() == 1.01)
                .findFirst().orElseThrow().t();
        double noSolutionT = drive.stream().filter(x -> x instanceof GnssFix g && g.fix() == FixType.NONE)
                .findFirst().orElseThrow().t();
        assertThat(stateAt(poses, outlierT)).as("the 60 m outlier").isEqualTo(NavState.DEGRADED);
        assertThat(stateAt(poses, outlierT + 0.2)).as("the next good fix").isEqualTo(NavState.AIDED);
        assertThat(stateAt(poses, noSolutionT)).as("the fix without a solution").isEqualTo(NavState.DEGRADED);
        assertThat(stateAt(poses, noSolutionT + 0.2)).as("the next good fix").isEqualTo(NavState.AIDED);
        // The fixes after the gap are held back until three agree over at least 1 s: the first fix 1 s
        // after the first held one is used.
        List<Double> after = goodFixTimes.stream().filter(t -> t >= T0 + OUTAGE_TO_S).toList();
        int firstUsed = 0;
        while (after.get(firstUsed) - after.get(0) < 1.0 - 1e-9) {
            assertThat(stateAt(poses, after.get(firstUsed))).isEqualTo(NavState.UNRELIABLE);
            firstUsed++;
        }
        assertThat(firstUsed).isGreaterThanOrEqualTo(2);
        assertThat(stateAt(poses, after.get(firstUsed))).isEqualTo(NavState.AIDED);
        assertThat(poses.get(poses.size() - 1).outage()).isEqualTo(Outage.NONE);
    }

    private static NavState stateAt(List<Pose> poses, double t) {
        NavState s = null;
        for (Pose p : poses) {
            if (p.t() == t) {
                s = p.state();
            }
        }
        return s;
    }

    private static List<Sample> script() {
        List<Sample> out = new ArrayList<>();
        for (Sample s : SyntheticDrive.generate(T0, 440.0, OUTAGE_FROM_S, OUTAGE_TO_S, 99L)) {
            double rel = s.t() - T0;
            if (s instanceof GnssFix g) {
                if (rel < 3.0) {
                    // No course or speed: the heading must come from displacement.
                    s = new GnssFix(g.t(), g.latDeg(), g.lonDeg(), g.altM(), g.sigmaHM(), g.sigmaVM(), g.fix(),
                            g.sats(), g.hdop(), Double.NaN, Double.NaN);
                } else if (Math.abs(rel - 20.0) < 1e-9) {
                    // 60 m north of the true fix; sigma_h 1.01 tags it for the test.
                    s = new GnssFix(g.t(), g.latDeg() + 60.0 / 111_200.0, g.lonDeg(), g.altM(), 1.01, g.sigmaVM(),
                            g.fix(), g.sats(), g.hdop(), g.speedMps(), g.courseDeg());
                } else if (Math.abs(rel - 30.0) < 1e-9) {
                    s = new GnssFix(g.t(), g.latDeg(), g.lonDeg(), g.altM(), g.sigmaHM(), g.sigmaVM(), FixType.NONE,
                            0, g.hdop(), Double.NaN, Double.NaN);
                }
            }
            out.add(s);
        }
        return out;
    }
}
