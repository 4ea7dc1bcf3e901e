package org.wayhold.filter;

import static org.wayhold.filter.StateIndex.EAST;
import static org.wayhold.filter.StateIndex.GYRO_BIAS;
import static org.wayhold.filter.StateIndex.GYRO_SCALE;
import static org.wayhold.filter.StateIndex.NORTH;
import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.SPEED_SCALE;
import static org.wayhold.filter.StateIndex.YAW;

import java.util.Arrays;

/**
 * The smoothed state at the nodes of a {@link SmootherLog}, from {@link RtsSmoother#smooth}: each node's
 * estimate given all the data of its segment. Node indexes are the log's.
 */
public final class SmoothedTrack {

    private final double[] tRel;
    private final boolean[] has;
    private final double[] x;
    private final double[] p;
    private final int pseudoInverseSteps;

    SmoothedTrack(double[] tRel, boolean[] has, double[] x, double[] p, int pseudoInverseSteps) {
        this.tRel = tRel;
        this.has = has;
        this.x = x;
        this.p = p;
        this.pseudoInverseSteps = pseudoInverseSteps;
    }

    /** Nodes (count), as in the log. */
    public int nodeCount() {
        return has.length;
    }

    /** True when node {@code k} has a smoothed state (the filter had a state when it was taken). */
    public boolean hasState(int k) {
        return has[k];
    }

    /** Backward steps whose gain needed the pseudo-inverse (count): zero for a well-posed filter. */
    public int pseudoInverseSteps() {
        return pseudoInverseSteps;
    }

    /** The smoothed state vector at node {@code k} (a copy, layout {@link StateIndex}). */
    public double[] stateVector(int k) {
        require(k);
        return Arrays.copyOfRange(x, k * SIZE, (k + 1) * SIZE);
    }

    /** The smoothed covariance at node {@code k} (a copy, row-major SIZE x SIZE). */
    public double[] covariance(int k) {
        require(k);
        double[] full = new double[SIZE * SIZE];
        SmootherLog.unpackUpper(p, k * SmootherLog.TRIANGLE, full);
        return full;
    }

    /** The smoothed estimate at node {@code k}. */
    public SmoothedState state(int k) {
        require(k);
        int o = k * SIZE;
        int t = k * SmootherLog.TRIANGLE;
        return new SmoothedState(tRel[k], x[o + EAST], x[o + NORTH], x[o + YAW], x[o + GYRO_BIAS],
                x[o + SPEED_SCALE], x[o + GYRO_SCALE], p[t + upper(EAST, EAST)], p[t + upper(EAST, NORTH)],
                p[t + upper(NORTH, NORTH)], p[t + upper(YAW, YAW)]);
    }

    /** Index of entry (i, j), i <= j, in a packed upper triangle. */
    private static int upper(int i, int j) {
        return i * SIZE - i * (i - 1) / 2 + (j - i);
    }

    private void require(int k) {
        if (k < 0 || k >= has.length) {
            throw new IndexOutOfBoundsException("node: " + k + " is not among the " + has.length + " nodes");
        }
        if (!has[k]) {
            throw new IllegalArgumentException("node: " + k + " has no smoothed state (taken before the filter had one)");
        }
    }
}
