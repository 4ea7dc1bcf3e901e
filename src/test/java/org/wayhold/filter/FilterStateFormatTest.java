package org.wayhold.filter;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.DataInputStream;
import java.io.DataOutputStream;
import java.io.IOException;
import java.nio.ByteBuffer;
import org.junit.jupiter.api.Test;
import org.wayhold.settings.FilterSettings;
import org.wayhold.settings.GatingSettings;
import org.wayhold.settings.OutageSettings;
import org.wayhold.settings.VehicleProfile;

/**
 * The binary form of a filter state: a state that has taken fixes comes back bit for bit with the time
 * of its last trusted fix and the ln det S of its newest fix, and a state of an earlier format is refused
 * rather than misread. Format 5 matters most: it was written by layouts holding one of those two slots
 * and not the other, with the same slot count, so only the format number tells them apart; format 6
 * lacked the remembered fault of the fixes.
 *
 * <p>The drive: due east at 10 m/s from the origin, exact inputs, fixes every 0.2 s on the true
 * position (an exact hand case: the fixes agree with the odometry, so every one is used at its claimed
 * accuracy).
 */
class FilterStateFormatTest {

    private static final double SPEED_MPS = 10.0;
    private static final double SIGMA_M = 1.0;

    private static NavigationFilter drivenFilter() {
        NavigationFilter f = new NavigationFilter(FilterSettings.defaults(), GatingSettings.defaults(),
                OutageSettings.defaults(), VehicleProfile.defaults());
        double[] x = FilterFixtures.state(0.0, 0.0, 0.0, 0.0, 1.0, 0.0, 0.0);
        double[] p = FilterFixtures.diagonal(0.25, 0.25, 1e-6, 1e-10, 1e-6, 0.1, 0.1);
        p[StateIndex.GYRO_SCALE * StateIndex.SIZE + StateIndex.GYRO_SCALE] = 1e-6;
        f.initialize(0.0, x, p);
        f.setWheelSpeed(SPEED_MPS);
        f.setYawRate(0.0);
        for (int i = 1; i <= 10; i++) {
            double t = 0.2 * i;
            f.predictTo(t);
            f.correct(FilterFixtures.fix(t, SIGMA_M), SPEED_MPS * t, 0.0, 0.0);
        }
        return f;
    }

    private static byte[] bytes(FilterState state) throws IOException {
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        NavigationFilter.writeState(state, new DataOutputStream(out));
        return out.toByteArray();
    }

    @Test
    void aStateThatTookFixesComesBackBitForBit() throws IOException {
        NavigationFilter f = drivenFilter();
        FilterState saved = f.saveState();
        assertThat(f.lastLogDetS()).as("ln det S of the newest fix").isFinite();
        assertThat(saved.get(FilterState.Slot.LAST_TRUSTED_FIX_T_REL)).as("time of the last trusted fix")
                .isFinite();
        byte[] written = bytes(saved);

        FilterState read = f.readState(new DataInputStream(new ByteArrayInputStream(written)));
        assertThat(bytes(read)).isEqualTo(written);
        NavigationFilter restored = drivenFilter();
        restored.restore(read);
        assertThat(restored.lastLogDetS()).isEqualTo(f.lastLogDetS());
    }

    @Test
    void earlierFormatsAreRefusedByNumber() throws IOException {
        NavigationFilter f = drivenFilter();
        byte[] written = bytes(f.saveState());
        assertThat(ByteBuffer.wrap(written).getInt()).isEqualTo(FilterState.FORMAT).isEqualTo(7);
        for (int earlier = 1; earlier < FilterState.FORMAT; earlier++) {
            byte[] old = written.clone();
            ByteBuffer.wrap(old).putInt(earlier);
            int format = earlier;
            assertThatThrownBy(() -> f.readState(new DataInputStream(new ByteArrayInputStream(old))))
                    .isInstanceOf(IOException.class)
                    .hasMessage("filter state: format " + format + ", expected 7");
        }
    }
}
