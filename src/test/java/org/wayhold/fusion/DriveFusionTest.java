package org.wayhold.fusion;

import static org.assertj.core.api.Assertions.assertThat;

import java.util.ArrayList;
import java.util.List;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.EigenDecomposition;
import org.apache.commons.math3.linear.RealMatrix;
import org.junit.jupiter.api.Test;
import org.wayhold.filter.RtsSmoother;
import org.wayhold.filter.SmoothedTrack;
import org.wayhold.filter.SmootherLog;
import org.wayhold.filter.StateIndex;
import org.wayhold.pipeline.FixRecord;
import org.wayhold.pipeline.OrderedLog;
import org.wayhold.pipeline.TrackOutput;
import org.wayhold.pipeline.VehiclePipeline;
import org.wayhold.pipeline.VehicleTrack;
import org.wayhold.pose.Pose;
import org.wayhold.sample.Sample;
import org.wayhold.settings.Settings;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;

/**
 * {@link DriveFusion} runs the live pipeline, and smoothing leaves the forward pass alone; on the full
 * non-linear model the smoothed covariance is nowhere larger than the filtered one.
 */
class DriveFusionTest {

    private static final Settings SETTINGS = Settings.defaults();

    private static SimulatedDrive drive() {
        return DriveSimulator.simulate(SimulationSettings.defaults().withMinutes(5).withWarmUpS(90).withTunnelsS(45),
                29L);
    }

    @Test
    void theForwardTrackIsWhatTheLivePipelineHoldsAndSmoothingLeavesItAlone() {
        SimulatedDrive d = drive();
        // The live path: the same log posted in batches of 1000 lines to a vehicle's pipeline.
        List<Pose> live = new ArrayList<>();
        VehiclePipeline pipeline = new VehiclePipeline(SETTINGS, SETTINGS.profileFor("default"), null, new TrackOutput() {
            @Override
            public void pose(Pose pose) {
                if (!live.isEmpty() && live.get(live.size() - 1).t() == pose.t()) {
                    live.set(live.size() - 1, pose);
                } else {
                    live.add(pose);
                }
            }

            @Override
            public void fix(FixRecord record) {
            }

            @Override
            public void rewoundTo(double tS) {
                live.removeIf(p -> p.t() > tS);
            }
        });
        List<Sample> samples = d.samples();
        for (int i = 0; i < samples.size(); i += OrderedLog.BATCH_SAMPLES) {
            pipeline.submit(samples.subList(i, Math.min(samples.size(), i + OrderedLog.BATCH_SAMPLES)));
        }
        FusedDrive plain = DriveFusion.fuse("d", samples, SETTINGS, SETTINGS.profileFor("default"), false);
        FusedDrive smoothed = DriveFusion.fuse("d", samples, SETTINGS, SETTINGS.profileFor("default"), true);
        assertThat(plain.forward()).hasSameSizeAs(live);
        for (int i = 0; i < live.size(); i++) {
            Pose p = live.get(i);
            FusedPoint f = plain.forward().get(i);
            // Bit for bit: the same samples in the same order through the same classes.
            assertThat(f.t()).isEqualTo(p.t());
            assertThat(f.eastM()).isEqualTo(p.eastM());
            assertThat(f.northM()).isEqualTo(p.northM());
            assertThat(f.covEastEastM2()).isEqualTo(p.covEastEastM2());
            assertThat(f.state()).isEqualTo(p.state());
            assertThat(f.reasons()).isEqualTo(p.reasons());
        }
        // Recording for the smoother only reads the filter: the forward track is the same to the bit.
        assertThat(smoothed.forward()).isEqualTo(plain.forward());
        assertThat(smoothed.smoothed()).hasSameSizeAs(plain.forward());
        assertThat(plain.smoothed()).isEmpty();
        assertThat(plain.smoothing()).isNull();
    }

    @Test
    void theSmoothedCovarianceIsNeverLargerThanTheFilteredOneOnTheFullModel() {
        // P_filtered - P_smoothed must be positive semi-definite at every node (Rauch, Tung, Striebel
        // 1965: the smoothed estimate has all the filtered one has, and more). Checked by its
        // eigenvalues with Commons Math 3.6.1's EigenDecomposition; rounding tolerance 1e-9 of P's
        // largest entry (P spans variances of 1e-9 rad^2/s^2 to hundreds of m^2).
        SimulatedDrive d = drive();
        VehicleTrack track = new VehicleTrack(SETTINGS, SETTINGS.profileFor("default"), null, TrackOutput.NONE);
        SmootherLog log = track.recordForSmoothing();
        for (Sample s : OrderedLog.order(d.samples(), SETTINGS.ordering()).samples()) {
            track.apply(s);
        }
        log.finish();
        SmoothedTrack st = RtsSmoother.smooth(log);
        int n = StateIndex.SIZE;
        int checked = 0;
        double largestGain = 0;
        for (int k = 0; k < log.nodeCount(); k++) {
            if (!log.hasState(k)) {
                continue;
            }
            double[] pf = log.filteredCovariance(k);
            double[] ps = st.covariance(k);
            RealMatrix diff = new Array2DRowRealMatrix(n, n);
            double scale = 0;
            for (int i = 0; i < n; i++) {
                for (int j = 0; j < n; j++) {
                    diff.setEntry(i, j, 0.5 * ((pf[i * n + j] - ps[i * n + j]) + (pf[j * n + i] - ps[j * n + i])));
                    scale = Math.max(scale, Math.abs(pf[i * n + j]));
                }
            }
            for (double ev : new EigenDecomposition(diff).getRealEigenvalues()) {
                assertThat(ev).as("node %d: eigenvalue of P_filtered - P_smoothed", k).isGreaterThan(-1e-9 * scale);
                largestGain = Math.max(largestGain, ev);
            }
            checked++;
        }
        assertThat(checked).isGreaterThan(1000);
        // Through the 45 s tunnel the smoother must take metres squared off the dead reckoning's variance.
        assertThat(largestGain).isGreaterThan(1.0);
    }
}
