package org.wayhold.filter;

import java.util.concurrent.TimeUnit;
import org.ejml.data.DMatrixRMaj;
import org.ejml.dense.row.CommonOps_DDRM;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Fork;
import org.openjdk.jmh.annotations.Measurement;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.Setup;
import org.openjdk.jmh.annotations.State;
import org.openjdk.jmh.annotations.Warmup;

/**
 * The product the smoother's log makes at every filter step while recording, C = C F': its hand-written
 * product over F's structure ({@link SmootherLog#timesTranspose}) against EJML's dense
 * {@code multTransB}, and against a product that reads F's pattern from the matrix at each step. F is a
 * real step's (a turn at 15 m/s, 0.01 s) from {@link MotionModel#step}, C a full 11 x 11 matrix. All
 * give the same product (checked in setup to 1e-12 relative). Run with the CPU-time profiler: the
 * machine's shared cores make wall-clock scores of nanosecond operations move with the load.
 */
@State(Scope.Thread)
@BenchmarkMode(Mode.AverageTime)
@OutputTimeUnit(TimeUnit.NANOSECONDS)
@Warmup(iterations = 3, time = 1)
@Measurement(iterations = 5, time = 1)
@Fork(1)
public class CrossCovarianceBenchmark {

    private static final int N = StateIndex.SIZE;
    private final double[] f = new double[N * N];
    private final double[] c = new double[N * N];
    private final double[] out = new double[N * N];
    private final int[] rowCols = new int[N * N];
    private final int[] rowCounts = new int[N];
    private final DMatrixRMaj cm = new DMatrixRMaj(N, N);
    private final DMatrixRMaj fm = new DMatrixRMaj(N, N);
    private final DMatrixRMaj om = new DMatrixRMaj(N, N);

    @Setup
    public void setUp() {
        double[] x = new double[N];
        x[StateIndex.YAW] = 0.7;
        x[StateIndex.GYRO_BIAS] = 0.001;
        x[StateIndex.SPEED_SCALE] = 1.01;
        x[StateIndex.GYRO_SCALE] = 0.99;
        MotionModel.step(x, 15.0, 0.2, 0.01, false, Math.exp(-0.01 / 40.0), new double[N], f, new double[6]);
        java.util.SplittableRandom r = new java.util.SplittableRandom(1);
        for (int i = 0; i < N * N; i++) {
            c[i] = r.nextDouble() - 0.5;
        }
        System.arraycopy(c, 0, cm.data, 0, N * N);
        System.arraycopy(f, 0, fm.data, 0, N * N);
        timesTransposeSparse(c, f, out, rowCols, rowCounts);
        CommonOps_DDRM.multTransB(cm, fm, om);
        double[] structured = c.clone();
        SmootherLog.timesTranspose(structured, f, new double[N]);
        for (int i = 0; i < N * N; i++) {
            if (Math.abs(out[i] - om.data[i]) > 1e-12 * Math.max(1.0, Math.abs(om.data[i]))
                    || Math.abs(structured[i] - om.data[i]) > 1e-12 * Math.max(1.0, Math.abs(om.data[i]))) {
                throw new IllegalStateException("benchmark self-check failed: entry " + i + " differs");
            }
        }
    }

    private final double[] work = new double[N * N];
    private final double[] row = new double[N];

    /** What the log does: a copy of C (so every call multiplies the same C), then C F' in place. */
    @Benchmark
    public double[] structuredHandWritten() {
        System.arraycopy(c, 0, work, 0, N * N);
        SmootherLog.timesTranspose(work, f, row);
        return work;
    }

    @Benchmark
    public double[] sparseHandWritten() {
        timesTransposeSparse(c, f, out, rowCols, rowCounts);
        return out;
    }

    /** out = C F' over the nonzero entries of F, its pattern read from the matrix. */
    static void timesTransposeSparse(double[] c, double[] f, double[] out, int[] rowCols, int[] rowCounts) {
        for (int b = 0; b < N; b++) {
            int n = 0;
            int row = b * N;
            for (int j = 0; j < N; j++) {
                if (f[row + j] != 0.0) {
                    rowCols[row + n++] = j;
                }
            }
            rowCounts[b] = n;
        }
        for (int a = 0; a < N; a++) {
            int ra = a * N;
            for (int b = 0; b < N; b++) {
                int rb = b * N;
                double v = 0.0;
                for (int q = 0; q < rowCounts[b]; q++) {
                    int j = rowCols[rb + q];
                    v += c[ra + j] * f[rb + j];
                }
                out[ra + b] = v;
            }
        }
    }

    @Benchmark
    public DMatrixRMaj denseEjml() {
        CommonOps_DDRM.multTransB(cm, fm, om);
        return om;
    }
}
