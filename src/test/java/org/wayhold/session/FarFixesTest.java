package org.wayhold.session;

import static org.assertj.core.api.Assertions.assertThat;

import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.wayhold.pose.Pose;
import org.wayhold.sample.FixType;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.Sample;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;
import org.wayhold.settings.Settings;

/**
 * Rule: fixes on the far side of the globe from a session's origin, each valid on its own, never fail
 * a batch. Once enough of them agree the filter restarts its position there, a quarter of the Earth
 * away along the tangent plane and so close to the centre of the Earth that no geodetic position
 * exists; such a pose keeps its ENU position and reports no latitude and longitude, and the session
 * goes on. (A receiver that reports 0, 0 while it has no solution sends exactly such fixes.) Expected
 * values: exact hand cases of the behaviour, not numbers.
 */
class FarFixesTest {

    @Test
    void agreeingFixesAQuarterOfTheGlobeAwayLeaveASessionThatStillAnswers() {
        VehicleSession s = new VehicleSession("far", Settings.defaults(), null);
        double t = 1.8e9;
        List<Sample> batch = new ArrayList<>();
        for (int i = 0; i < 100; i++, t += 0.1) {
            batch.add(new YawRate(t, 0.0));
            batch.add(new WheelSpeed(t, 10.0));
            if (i % 2 == 0) {
                // Driving north near 48 N, 11 E at 10 m/s.
                batch.add(new GnssFix(t, 48.0 + i * 0.5 * 1e-5 * 0.9, 11.0, 500.0, 1.0, 2.0, FixType.THREE_D, 9, 1.0,
                        10.0, 0.0));
            }
        }
        s.submit(batch);
        assertThat(s.latest().orElseThrow().latDeg()).isBetween(47.9, 48.1);
        for (double lat : new double[] {-41.9, 0.0}) {
            List<Sample> far = new ArrayList<>();
            for (int i = 0; i < 60; i++, t += 0.1) {
                far.add(new YawRate(t, 0.0));
                far.add(new WheelSpeed(t, 10.0));
                if (i % 2 == 0) {
                    far.add(new GnssFix(t, lat, 101.0, 0.0, 1.0, 2.0, FixType.THREE_D, 9, 1.0, 10.0, 0.0));
                }
            }
            s.submit(far);
        }
        Pose p = s.latest().orElseThrow();
        assertThat(p.t()).isEqualTo(t - 0.1, org.assertj.core.api.Assertions.within(1e-6));
        assertThat(s.track(Double.NEGATIVE_INFINITY, Double.POSITIVE_INFINITY)).isNotEmpty();
    }
}
