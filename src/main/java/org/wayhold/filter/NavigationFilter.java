package org.wayhold.filter;

import static org.wayhold.filter.StateIndex.EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_NORTH;
import static org.wayhold.filter.StateIndex.GYRO_BIAS;
import static org.wayhold.filter.StateIndex.NORTH;
import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.SPEED_SCALE;
import static org.wayhold.filter.StateIndex.YAW;

import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;
import java.util.Arrays;
import org.wayhold.geo.Angles;
import org.wayhold.sample.FixType;
import org.wayhold.sample.GnssFix;
import org.wayhold.settings.FilterSettings;
import org.wayhold.settings.GatingSettings;
import org.wayhold.settings.OutageSettings;
import org.wayhold.settings.VehicleProfile;

/**
 * The extended Kalman filter of one vehicle: wheel speed and yaw rate drive the prediction, GNSS
 * fixes correct it.
 *
 * <p>Events must arrive in time order (the {@code ordering} package sees to that). Each event first
 * calls {@link #predictTo(double)} with its time; inputs are held from one reading to the next
 * (zero-order hold). Times are seconds relative to the session epoch.
 *
 * <p>Covariance updates use the Joseph form, P = (I - K H) P (I - K H)' + K R K', which keeps P
 * symmetric and positive semi-definite for any gain (Bucy and Joseph, <i>Filtering for Stochastic
 * Processes with Applications to Guidance</i>, 1968; Brown and Hwang, 4th ed., sec. 4.2). After every
 * update P is symmetric by construction (its upper triangle is mirrored); a non-positive variance is
 * repaired and counted. Both products skip the structural zeros of F and H (see
 * {@link #predictCovariance} and {@link #josephUpdate}): a step allocates nothing and costs a few
 * hundred multiplications.
 *
 * <p>Instances are mutable and not thread-safe: one writer per vehicle. {@link #copy()} and
 * {@link #restore(NavigationFilter)} take and return to checkpoints for re-filtering late samples.
 */
public final class NavigationFilter {

    /** Wheel speeds below this magnitude count as zero (m/s): quantised sensors report exactly 0. */
    private static final double ZERO_SPEED_MPS = 1e-3;
    /** Displacement-based initial yaw needs the wheels to say the vehicle is moving (m/s). */
    private static final double MOVING_SPEED_MPS = 0.5;
    /** Steps longer than this are split, so the linearised covariance stays close (s). */
    private static final double MAX_STEP_S = 0.1;
    /** Inputs are extended along their trend at most this far past the latest reading (s). */
    private static final double MAX_EXTRAPOLATION_S = 0.1;
    /**
     * Random walk of the height between fixes (m^2/s): a road climbs a few percent, so at motorway
     * speed the height changes by up to about 0.5 m/s (common practice, not a published figure).
     */
    private static final double UP_RANDOM_WALK_M2_PER_S = 0.25;
    /**
     * A reacquisition whose normalised innovation squared exceeds this restarts position and yaw
     * instead of correcting them: about 30 sigma, far beyond any honest covariance.
     */
    private static final double RESET_NIS = 900.0;
    /** Largest gyro bias kept across a reset (rad/s): 5 deg/s, far beyond automotive yaw-rate sensors. */
    private static final double PLAUSIBLE_BIAS_RAD_PER_S = Math.toRadians(5.0);
    /** Largest wheel-speed scale error kept across a reset (unitless): 20%, beyond any tyre. */
    private static final double PLAUSIBLE_SCALE_ERROR = 0.2;

    private final FilterSettings settings;
    private final VehicleProfile profile;
    private final double gateThreshold;
    private final double gapS;
    private final int reacquireFixes;

    private final double[] x = new double[SIZE];
    private final double[] p = new double[SIZE * SIZE];
    private boolean initialized;
    private double tRel = Double.NaN;

    private double upM;
    private double varUpM2 = Double.POSITIVE_INFINITY;

    private double wheelSpeedMps;
    private double wheelSpeedTRel = Double.NaN;
    private double previousWheelSpeedMps;
    private double previousWheelSpeedTRel = Double.NaN;
    private double yawRateRadPerS;
    private double yawRateTRel = Double.NaN;
    private double previousYawRateRadPerS;
    private double previousYawRateTRel = Double.NaN;
    private boolean hasYawRate;
    private double zeroSpeedSinceTRel = Double.NaN;
    private boolean standstill;

    private double correlatedVarM2;
    /**
     * exp(-dt / tau) of the last step length {@link #decayDtS}: at a steady input rate every step has
     * the same length, and the exponential is a visible share of a step. A cache, not state.
     */
    private double decayDtS = Double.NaN;
    private double decayForDt;
    private double odometerM;
    private double lastUsedFixTRel = Double.NaN;
    private double lastFixTRel = Double.NaN;
    private double odometerAtLastUsedFixM = Double.NaN;
    private GnssOutcome.Kind lastKind;
    private double lastNis = Double.NaN;

    /** Initial position anchor while the yaw is still unknown. */
    private double anchorEastM = Double.NaN;
    private double anchorNorthM = Double.NaN;
    private double anchorOdometerM = Double.NaN;

    /** Reacquisition: fixes held back after a gap or a gated fix. */
    private Probation probation = Probation.NONE;
    private final double[][] pending;
    private int pendingCount;

    private long fixesUsed;
    private long fixesGated;
    private long fixesPending;
    private long fixesDropped;
    private long fixesUnusable;
    private long velocityGated;
    private long covarianceRepairs;
    private long resets;

    // Work arrays, allocated once so a step allocates nothing; null in a state copy (stateCopy()).
    private final double[] xNext;
    private final double[] f;
    private final double[] tmp;
    private final double[] inputJac;
    private final double[] h;
    private final double[] r;
    private final double[] nu;
    private final double[] ph;
    private final double[] k;
    private final double[] sInv;
    private final double[] hp;
    /** Columns where H has a nonzero entry, ascending; filled with S. */
    private final int[] hCols;
    private int hColCount;
    /**
     * True while H, R and S are those of a position fix, set up by {@link #positionInnovation}: the
     * update then takes the routines written out for that H.
     */
    private boolean positionH;

    private enum Probation { NONE, AFTER_GAP, AFTER_GATE }

    /** Version of the layout {@link #writeState} writes. */
    private static final int STATE_FORMAT = 2;

    /** Per held fix: east innovation, north innovation, white variance, odometer, time. */
    private static final int PENDING_FIELDS = 5;

    public NavigationFilter(FilterSettings settings, GatingSettings gating, OutageSettings outage,
                            VehicleProfile profile) {
        this.settings = settings;
        this.profile = profile;
        this.gateThreshold = ChiSquare.quantile2Dof(gating.chiSquareProbability());
        this.gapS = outage.gapS();
        this.reacquireFixes = gating.reacquireFixes();
        this.pending = new double[reacquireFixes][PENDING_FIELDS];
        double sigma = settings.gnssDefaultSigmaM();
        this.correlatedVarM2 = settings.gnssCorrelatedShare() * sigma * sigma;
        xNext = new double[SIZE];
        f = new double[SIZE * SIZE];
        tmp = new double[SIZE * SIZE];
        inputJac = new double[6];
        h = new double[2 * SIZE];
        r = new double[4];
        nu = new double[2];
        ph = new double[SIZE * 2];
        k = new double[SIZE * 2];
        sInv = new double[4];
        hp = new double[2 * SIZE];
        hCols = new int[SIZE];
    }

    /** A deep copy that can run on its own (branches, such as a drive survey's outage windows). */
    public NavigationFilter copy() {
        return new NavigationFilter(this, true);
    }

    /**
     * A copy of the state alone, for checkpoints that are only restored from: it can be given to
     * {@link #restore}, written and read, and answers the read-only queries, but it must not be
     * stepped (it has no work arrays, which are about 1.7 KB of a filter's 2.4 KB).
     */
    public NavigationFilter stateCopy() {
        return new NavigationFilter(this, false);
    }

    private NavigationFilter(NavigationFilter o, boolean withWorkArrays) {
        this.settings = o.settings;
        this.profile = o.profile;
        this.gateThreshold = o.gateThreshold;
        this.gapS = o.gapS;
        this.reacquireFixes = o.reacquireFixes;
        this.pending = new double[reacquireFixes][PENDING_FIELDS];
        xNext = withWorkArrays ? new double[SIZE] : null;
        f = withWorkArrays ? new double[SIZE * SIZE] : null;
        tmp = withWorkArrays ? new double[SIZE * SIZE] : null;
        inputJac = withWorkArrays ? new double[6] : null;
        h = withWorkArrays ? new double[2 * SIZE] : null;
        r = withWorkArrays ? new double[4] : null;
        nu = withWorkArrays ? new double[2] : null;
        ph = withWorkArrays ? new double[SIZE * 2] : null;
        k = withWorkArrays ? new double[SIZE * 2] : null;
        sInv = withWorkArrays ? new double[4] : null;
        hp = withWorkArrays ? new double[2 * SIZE] : null;
        hCols = withWorkArrays ? new int[SIZE] : null;
        restore(o);
    }

    /** Makes this filter an exact copy of {@code o}, which must share its settings. */
    public void restore(NavigationFilter o) {
        System.arraycopy(o.x, 0, x, 0, SIZE);
        System.arraycopy(o.p, 0, p, 0, SIZE * SIZE);
        initialized = o.initialized;
        tRel = o.tRel;
        upM = o.upM;
        varUpM2 = o.varUpM2;
        wheelSpeedMps = o.wheelSpeedMps;
        wheelSpeedTRel = o.wheelSpeedTRel;
        previousWheelSpeedMps = o.previousWheelSpeedMps;
        previousWheelSpeedTRel = o.previousWheelSpeedTRel;
        yawRateRadPerS = o.yawRateRadPerS;
        yawRateTRel = o.yawRateTRel;
        previousYawRateRadPerS = o.previousYawRateRadPerS;
        previousYawRateTRel = o.previousYawRateTRel;
        hasYawRate = o.hasYawRate;
        zeroSpeedSinceTRel = o.zeroSpeedSinceTRel;
        standstill = o.standstill;
        correlatedVarM2 = o.correlatedVarM2;
        odometerM = o.odometerM;
        lastUsedFixTRel = o.lastUsedFixTRel;
        lastFixTRel = o.lastFixTRel;
        odometerAtLastUsedFixM = o.odometerAtLastUsedFixM;
        lastKind = o.lastKind;
        lastNis = o.lastNis;
        anchorEastM = o.anchorEastM;
        anchorNorthM = o.anchorNorthM;
        anchorOdometerM = o.anchorOdometerM;
        resets = o.resets;
        probation = o.probation;
        pendingCount = o.pendingCount;
        for (int i = 0; i < pendingCount; i++) {
            System.arraycopy(o.pending[i], 0, pending[i], 0, PENDING_FIELDS);
        }
        fixesUsed = o.fixesUsed;
        fixesGated = o.fixesGated;
        fixesPending = o.fixesPending;
        fixesDropped = o.fixesDropped;
        fixesUnusable = o.fixesUnusable;
        velocityGated = o.velocityGated;
        covarianceRepairs = o.covarianceRepairs;
    }

    /**
     * Writes the whole mutable state, bit for bit, for snapshots that must restore the filter exactly.
     * The settings are not written: {@link #readState} needs a filter built with the same settings.
     * Keep in step with {@link #restore(NavigationFilter)}.
     */
    public void writeState(DataOutput out) throws IOException {
        out.writeInt(STATE_FORMAT);
        for (double v : x) {
            out.writeDouble(v);
        }
        for (double v : p) {
            out.writeDouble(v);
        }
        out.writeBoolean(initialized);
        double[] scalars = {tRel, upM, varUpM2, wheelSpeedMps, yawRateRadPerS, zeroSpeedSinceTRel, correlatedVarM2,
            odometerM, lastUsedFixTRel, lastFixTRel, odometerAtLastUsedFixM, lastNis, anchorEastM, anchorNorthM,
            anchorOdometerM, wheelSpeedTRel, previousWheelSpeedMps, previousWheelSpeedTRel, yawRateTRel,
            previousYawRateRadPerS, previousYawRateTRel};
        out.writeInt(scalars.length);
        for (double v : scalars) {
            out.writeDouble(v);
        }
        out.writeBoolean(hasYawRate);
        out.writeBoolean(standstill);
        out.writeInt(lastKind == null ? -1 : lastKind.ordinal());
        out.writeInt(probation.ordinal());
        out.writeInt(pendingCount);
        for (int i = 0; i < pendingCount; i++) {
            for (double v : pending[i]) {
                out.writeDouble(v);
            }
        }
        long[] counts = {fixesUsed, fixesGated, fixesPending, fixesDropped, fixesUnusable, velocityGated,
            covarianceRepairs, resets};
        out.writeInt(counts.length);
        for (long v : counts) {
            out.writeLong(v);
        }
    }

    /**
     * Reads what {@link #writeState} wrote into this filter, which must have the same settings.
     *
     * @throws IOException when the data is not a filter state of this format
     */
    public void readState(DataInput in) throws IOException {
        int format = in.readInt();
        if (format != STATE_FORMAT) {
            throw new IOException("filter state: format " + format + ", expected " + STATE_FORMAT);
        }
        for (int i = 0; i < SIZE; i++) {
            x[i] = in.readDouble();
        }
        for (int i = 0; i < SIZE * SIZE; i++) {
            p[i] = in.readDouble();
        }
        initialized = in.readBoolean();
        int n = in.readInt();
        if (n != 21) {
            throw new IOException("filter state: " + n + " scalars, expected 21");
        }
        tRel = in.readDouble();
        upM = in.readDouble();
        varUpM2 = in.readDouble();
        wheelSpeedMps = in.readDouble();
        yawRateRadPerS = in.readDouble();
        zeroSpeedSinceTRel = in.readDouble();
        correlatedVarM2 = in.readDouble();
        odometerM = in.readDouble();
        lastUsedFixTRel = in.readDouble();
        lastFixTRel = in.readDouble();
        odometerAtLastUsedFixM = in.readDouble();
        lastNis = in.readDouble();
        anchorEastM = in.readDouble();
        anchorNorthM = in.readDouble();
        anchorOdometerM = in.readDouble();
        wheelSpeedTRel = in.readDouble();
        previousWheelSpeedMps = in.readDouble();
        previousWheelSpeedTRel = in.readDouble();
        yawRateTRel = in.readDouble();
        previousYawRateRadPerS = in.readDouble();
        previousYawRateTRel = in.readDouble();
        hasYawRate = in.readBoolean();
        standstill = in.readBoolean();
        int kind = in.readInt();
        lastKind = kind < 0 ? null : GnssOutcome.Kind.values()[kind];
        probation = Probation.values()[in.readInt()];
        pendingCount = in.readInt();
        if (pendingCount < 0 || pendingCount > reacquireFixes) {
            throw new IOException("filter state: " + pendingCount + " held fixes, more than " + reacquireFixes);
        }
        for (int i = 0; i < pendingCount; i++) {
            for (int j = 0; j < PENDING_FIELDS; j++) {
                pending[i][j] = in.readDouble();
            }
        }
        int c = in.readInt();
        if (c != 8) {
            throw new IOException("filter state: " + c + " counters, expected 8");
        }
        fixesUsed = in.readLong();
        fixesGated = in.readLong();
        fixesPending = in.readLong();
        fixesDropped = in.readLong();
        fixesUnusable = in.readLong();
        velocityGated = in.readLong();
        covarianceRepairs = in.readLong();
        resets = in.readLong();
    }

    /**
     * Starts the filter from a given state and covariance, for tests and for callers that know the
     * initial pose by other means.
     *
     * @param tRelS time (s since epoch)
     * @param state state vector, layout {@link StateIndex} (copied)
     * @param cov   covariance, row-major SIZE x SIZE (copied)
     */
    public void initialize(double tRelS, double[] state, double[] cov) {
        System.arraycopy(state, 0, x, 0, SIZE);
        System.arraycopy(cov, 0, p, 0, SIZE * SIZE);
        tRel = tRelS;
        initialized = true;
        lastUsedFixTRel = tRelS;
        odometerAtLastUsedFixM = odometerM;
    }

    /**
     * Propagates the state to {@code tRelS} with the held inputs.
     *
     * @param tRelS time (s since epoch), not before the current time
     */
    public void predictTo(double tRelS) {
        if (Double.isNaN(tRel)) {
            tRel = tRelS;
            return;
        }
        double dt = tRelS - tRel;
        if (dt < 0.0) {
            throw new IllegalStateException("time went back by " + (-dt) + " s: samples must be ordered");
        }
        double from = tRel;
        while (dt > 0.0) {
            double step = Math.min(dt, MAX_STEP_S);
            propagate(step, from + 0.5 * step);
            from += step;
            dt -= step;
        }
        tRel = tRelS;
    }

    /**
     * An input's value at {@code tMidRel}: the latest reading extended along the line through the last
     * two readings, at most one reading interval (and {@link #MAX_EXTRAPOLATION_S}) ahead. A held value
     * lags a changing input by half a reading interval on average, which adds up while the vehicle
     * accelerates or enters a turn; the line does not, and its noise telescopes over consecutive steps
     * (the weights 1.5 and -0.5 of two readings sum to 1), so the integrated noise is that of holding.
     */
    private static double extended(double value, double valueT, double previous, double previousT, double tMidRel) {
        double interval = valueT - previousT;
        if (!(interval > 0.0)) {
            return value;
        }
        double ahead = Math.min(tMidRel - valueT, Math.min(interval, MAX_EXTRAPOLATION_S));
        if (ahead <= 0.0) {
            return value;
        }
        return value + (value - previous) / interval * ahead;
    }

    /** Holds a new wheel speed from now on (m/s, signed). Call after {@link #predictTo}. */
    public void setWheelSpeed(double speedMps) {
        previousWheelSpeedMps = wheelSpeedMps;
        previousWheelSpeedTRel = wheelSpeedTRel;
        wheelSpeedMps = speedMps;
        wheelSpeedTRel = tRel;
        if (Math.abs(speedMps) < ZERO_SPEED_MPS) {
            if (Double.isNaN(zeroSpeedSinceTRel)) {
                zeroSpeedSinceTRel = tRel;
            }
            standstill = tRel - zeroSpeedSinceTRel >= settings.standstillAfterS();
        } else {
            zeroSpeedSinceTRel = Double.NaN;
            standstill = false;
        }
    }

    /**
     * Holds a new yaw rate from now on (rad/s, counter-clockwise positive). Call after
     * {@link #predictTo}. At a standstill the reading observes the gyro bias directly (zero angular
     * rate update).
     */
    public void setYawRate(double rateRadPerS) {
        previousYawRateRadPerS = yawRateRadPerS;
        previousYawRateTRel = yawRateTRel;
        yawRateRadPerS = rateRadPerS;
        yawRateTRel = tRel;
        hasYawRate = true;
        if (Math.abs(wheelSpeedMps) < ZERO_SPEED_MPS && !Double.isNaN(zeroSpeedSinceTRel)) {
            // The standstill time is re-checked here too: the wheel-speed stream may be slower.
            standstill = tRel - zeroSpeedSinceTRel >= settings.standstillAfterS();
        }
        if (initialized && standstill) {
            zeroRateUpdate(rateRadPerS);
        }
    }

    private void zeroRateUpdate(double rateRadPerS) {
        // Measurement: rate = bias + white noise, so H picks the bias state.
        Arrays.fill(h, 0, SIZE, 0.0);
        h[GYRO_BIAS] = 1.0;
        double sigma = settings.gyroNoiseRadPerS();
        r[0] = Math.max(sigma * sigma, 1e-12);
        nu[0] = rateRadPerS - x[GYRO_BIAS];
        innovationCovarianceInverse(1);
        applyUpdate(1);
    }

    private void propagate(double dt, double tMidRel) {
        double wheel = extended(wheelSpeedMps, wheelSpeedTRel, previousWheelSpeedMps, previousWheelSpeedTRel,
                tMidRel);
        if (wheel * wheelSpeedMps <= 0.0) {
            // Never extend through zero: a stop or a change of direction shows in the readings first.
            wheel = wheelSpeedMps;
        }
        double rate = extended(yawRateRadPerS, yawRateTRel, previousYawRateRadPerS, previousYawRateTRel, tMidRel);
        odometerM += Math.abs((initialized ? x[SPEED_SCALE] : keptScale()) * wheel) * dt;
        if (!initialized) {
            return;
        }
        double decay;
        if (dt == decayDtS) {
            decay = decayForDt;
        } else {
            decay = Math.exp(-dt / settings.gnssCorrelationTimeS());
            decayDtS = dt;
            decayForDt = decay;
        }
        MotionModel.step(x, wheel, rate, dt, standstill, decay, xNext, f, inputJac);
        System.arraycopy(xNext, 0, x, 0, SIZE);
        x[YAW] = Angles.wrapPi(x[YAW]);

        // P = F P F'
        predictCovariance(f, p, tmp);

        // Q: input noise mapped through the input Jacobian G: a white input of density q held over dt
        // has variance q / dt, so Q += G G' q / dt (G already carries the factor dt).
        if (!standstill) {
            double qWheel = settings.wheelSpeedNoiseMps() * settings.wheelSpeedNoiseMps()
                    / settings.wheelSpeedRateHz();
            addOuter(inputJac, 0, qWheel / dt);
            double qGyro = settings.gyroNoiseRadPerS() * settings.gyroNoiseRadPerS() / settings.gyroRateHz();
            addOuter(inputJac, 3, qGyro / dt);
        }
        double rwBias = settings.gyroBiasRandomWalkRadPerSPerSqrtS();
        p[GYRO_BIAS * SIZE + GYRO_BIAS] += rwBias * rwBias * dt;
        double rwScale = settings.speedScaleRandomWalkPerSqrtS();
        p[SPEED_SCALE * SIZE + SPEED_SCALE] += rwScale * rwScale * dt;
        // Gauss-Markov driving noise keeps the steady-state variance: sigma^2 (1 - exp(-2 dt / tau)).
        double qGm = correlatedVarM2 * (1.0 - decay * decay);
        p[GNSS_ERR_EAST * SIZE + GNSS_ERR_EAST] += qGm;
        p[GNSS_ERR_NORTH * SIZE + GNSS_ERR_NORTH] += qGm;

        if (Double.isFinite(varUpM2) && !standstill) {
            varUpM2 += UP_RANDOM_WALK_M2_PER_S * dt;
        }
    }

    /** Adds v v' * scale to the (east, north, yaw) block of P, v = three entries of g from offset. */
    private void addOuter(double[] g, int offset, double scale) {
        for (int i = 0; i < 3; i++) {
            double gi = g[offset + i] * scale;
            if (gi == 0.0) {
                continue;
            }
            for (int j = 0; j < 3; j++) {
                p[i * SIZE + j] += gi * g[offset + j];
            }
        }
    }

    /**
     * The 1-sigma horizontal error per axis the filter assumes for a fix (m): {@code sigma_h} when
     * given, else HDOP times the configured range error, else the configured default; scaled by the
     * fix type and never below the configured floor.
     */
    public double horizontalSigmaM(GnssFix fix) {
        double sigma;
        if (fix.hasSigmaH()) {
            sigma = fix.sigmaHM();
        } else if (fix.hasHdop()) {
            sigma = fix.hdop() * settings.gnssRangeErrorM();
        } else {
            sigma = settings.gnssDefaultSigmaM();
        }
        sigma *= settings.fixScale(fix.fix());
        return Math.max(sigma, settings.gnssFloorM());
    }

    /**
     * Corrects the state with a fix already converted to the session's ENU frame. Call
     * {@link #predictTo} with the fix time first.
     *
     * @param fix    the fix (for its accuracy, type, speed and course)
     * @param eastM  fix east (m, ENU)
     * @param northM fix north (m, ENU)
     * @param upM    fix up (m, ENU), NaN when the fix has no height
     * @return the decision, never null
     */
    public GnssOutcome updateGnss(GnssFix fix, double eastM, double northM, double fixUpM) {
        GnssOutcome.Kind kind = correct(fix, eastM, northM, fixUpM);
        return outcome(kind, lastNis);
    }

    /**
     * As {@link #updateGnss} but returns only the decision, allocating nothing: the hot path of
     * replays. The normalised innovation squared is {@link #lastNis()}.
     */
    public GnssOutcome.Kind correct(GnssFix fix, double eastM, double northM, double fixUpM) {
        lastFixTRel = tRel;
        lastNis = Double.NaN;
        GnssOutcome.Kind kind = decideGnss(fix, eastM, northM, fixUpM);
        lastKind = kind;
        switch (kind) {
            case ACCEPTED, REACQUIRED, INITIALIZING -> {
                fixesUsed++;
                lastUsedFixTRel = tRel;
                odometerAtLastUsedFixM = odometerM;
            }
            case GATED -> fixesGated++;
            case PENDING -> fixesPending++;
            case UNUSABLE -> fixesUnusable++;
            default -> throw new IllegalStateException("unhandled outcome " + kind);
        }
        return kind;
    }

    /** Normalised innovation squared of the last fix's position (unitless), NaN when not computed. */
    public double lastNis() {
        return lastNis;
    }

    private GnssOutcome outcome(GnssOutcome.Kind kind, double nis) {
        return new GnssOutcome(kind, nis, Double.isNaN(nis) ? Double.NaN : gateThreshold);
    }

    private GnssOutcome.Kind decideGnss(GnssFix fix, double eastM, double northM, double fixUpM) {
        if (fix.fix() == FixType.NONE) {
            return GnssOutcome.Kind.UNUSABLE;
        }
        double sigma = horizontalSigmaM(fix);
        double var = sigma * sigma;
        double share = settings.gnssCorrelatedShare();
        if (!initialized) {
            return initializeFrom(fix, eastM, northM, fixUpM, var);
        }
        correlatedVarM2 = share * var;
        double whiteVar = (1.0 - share) * var;
        updateUp(fix, fixUpM, sigma);

        if (probation == Probation.NONE && tRel - lastUsedFixTRel > gapS) {
            probation = Probation.AFTER_GAP;
            pendingCount = 0;
        }
        double nis = positionInnovation(eastM, northM, whiteVar);
        lastNis = nis;
        boolean passes = nis <= gateThreshold;
        GnssOutcome.Kind kind;
        if (probation == Probation.NONE || (probation == Probation.AFTER_GATE && passes)) {
            if (passes) {
                applyUpdate(2);
                probation = Probation.NONE;
                pendingCount = 0;
                kind = GnssOutcome.Kind.ACCEPTED;
            } else {
                probation = Probation.AFTER_GATE;
                pendingCount = 0;
                hold(whiteVar);
                kind = GnssOutcome.Kind.GATED;
            }
        } else {
            hold(whiteVar);
            if (pendingCount >= reacquireFixes && (nis > RESET_NIS || !calibrationPlausible())) {
                reset(eastM, northM);
                return GnssOutcome.Kind.INITIALIZING;
            }
            if (pendingCount >= reacquireFixes) {
                // Enough consecutive fixes agree: take the newest, whatever the gate says, so a filter
                // that drifted further than its covariance admits is pulled back.
                applyUpdate(2);
                probation = Probation.NONE;
                pendingCount = 0;
                kind = GnssOutcome.Kind.REACQUIRED;
            } else {
                kind = passes || probation == Probation.AFTER_GAP ? GnssOutcome.Kind.PENDING
                        : GnssOutcome.Kind.GATED;
            }
        }
        if (kind == GnssOutcome.Kind.ACCEPTED || kind == GnssOutcome.Kind.REACQUIRED) {
            velocityUpdate(fix);
        }
        return kind;
    }

    /**
     * Fills H, R and the innovation of a position fix and returns its normalised innovation squared.
     * The antenna sits at the lever arm (forward, left) rotated by the yaw; the fix also carries the
     * correlated GNSS error: h(x) = (east, north) + R(yaw) (forward, left) + (error east, error north).
     */
    private double positionInnovation(double eastM, double northM, double whiteVar) {
        double c = Math.cos(x[YAW]);
        double s = Math.sin(x[YAW]);
        double fwd = profile.leverArmForwardM();
        double left = profile.leverArmLeftM();
        double antEast = x[EAST] + fwd * c - left * s + x[GNSS_ERR_EAST];
        double antNorth = x[NORTH] + fwd * s + left * c + x[GNSS_ERR_NORTH];
        Arrays.fill(h, 0.0);
        h[EAST] = 1.0;
        h[YAW] = -fwd * s - left * c;
        h[GNSS_ERR_EAST] = 1.0;
        h[SIZE + NORTH] = 1.0;
        h[SIZE + YAW] = fwd * c - left * s;
        h[SIZE + GNSS_ERR_NORTH] = 1.0;
        r[0] = whiteVar;
        r[1] = 0.0;
        r[2] = 0.0;
        r[3] = whiteVar;
        nu[0] = eastM - antEast;
        nu[1] = northM - antNorth;
        positionCovarianceInverse(h[YAW], h[SIZE + YAW]);
        return nu[0] * (sInv[0] * nu[0] + sInv[1] * nu[1]) + nu[1] * (sInv[2] * nu[0] + sInv[3] * nu[1]);
    }

    /**
     * Holds the current fix's innovation for the agreement test. Consecutive fixes share the
     * prediction error, so the difference of two innovations only carries the fixes' white noise, the
     * change of the correlated GNSS error between them, and the error of the relative motion the wheels
     * and gyro predicted: distance driven times the yaw and scale uncertainty. A difference outside the
     * chi-square gate means they disagree, and the older ones are dropped.
     */
    private void hold(double whiteVar) {
        double relVarPerM2 = Math.max(p[YAW * SIZE + YAW], 0.0) + Math.max(p[SPEED_SCALE * SIZE + SPEED_SCALE], 0.0);
        // Newest first: a disagreement drops that fix and every older one.
        for (int i = pendingCount - 1; i >= 0; i--) {
            double[] q = pending[i];
            double de = nu[0] - q[0];
            double dn = nu[1] - q[1];
            double driven = odometerM - q[3];
            double gmChange = 2.0 * correlatedVarM2
                    * (1.0 - Math.exp(-(tRel - q[4]) / settings.gnssCorrelationTimeS()));
            double v = whiteVar + q[2] + driven * driven * relVarPerM2 + gmChange;
            if ((de * de + dn * dn) / v > gateThreshold) {
                int drop = i + 1;
                fixesDropped += drop;
                for (int j = 0; j < pendingCount - drop; j++) {
                    double[] kept = pending[j + drop];
                    pending[j + drop] = pending[j];
                    pending[j] = kept;
                }
                pendingCount -= drop;
                break;
            }
        }
        if (pendingCount == reacquireFixes) {
            // Full and all agree: shift out the oldest.
            double[] first = pending[0];
            System.arraycopy(pending, 1, pending, 0, reacquireFixes - 1);
            pending[reacquireFixes - 1] = first;
            pendingCount--;
        }
        double[] slot = pending[pendingCount++];
        slot[0] = nu[0];
        slot[1] = nu[1];
        slot[2] = whiteVar;
        slot[3] = odometerM;
        slot[4] = tRel;
    }

    /**
     * Course and speed over the ground, when the fix carries them and the vehicle moves fast enough
     * for the course to mean something. Course noise shrinks with speed (its error is roughly a
     * velocity error divided by the speed).
     */
    private void velocityUpdate(GnssFix fix) {
        if (!fix.hasSpeed() || !fix.hasCourse() || standstill) {
            return;
        }
        double minSpeed = settings.gnssVelocityMinSpeedMps();
        if (fix.speedMps() < minSpeed || Math.abs(wheelSpeedMps) < MOVING_SPEED_MPS) {
            return;
        }
        double courseYaw = Angles.headingDegToYawRad(fix.courseDeg());
        if (wheelSpeedMps < 0.0) {
            courseYaw = Angles.wrapPi(courseYaw + Math.PI);
        }
        double courseSigma = Math.toRadians(settings.gnssCourseSigmaDeg()) * Math.max(minSpeed, 1e-3)
                / fix.speedMps();
        double speedSigma = settings.gnssSpeedSigmaMps();
        double absWheel = Math.abs(wheelSpeedMps);
        Arrays.fill(h, 0.0);
        h[YAW] = 1.0;
        h[SIZE + SPEED_SCALE] = absWheel;
        r[0] = courseSigma * courseSigma;
        r[1] = 0.0;
        r[2] = 0.0;
        r[3] = speedSigma * speedSigma;
        nu[0] = Angles.wrapPi(courseYaw - x[YAW]);
        nu[1] = fix.speedMps() - x[SPEED_SCALE] * absWheel;
        innovationCovarianceInverse(2);
        double nis = nu[0] * (sInv[0] * nu[0] + sInv[1] * nu[1]) + nu[1] * (sInv[2] * nu[0] + sInv[3] * nu[1]);
        if (nis > gateThreshold) {
            velocityGated++;
            return;
        }
        applyUpdate(2);
    }

    private void updateUp(GnssFix fix, double fixUpM, double sigmaH) {
        if (Double.isNaN(fixUpM)) {
            return;
        }
        // Vertical GNSS error is commonly about 1.5 times the horizontal one (common practice).
        double sigmaV = fix.hasSigmaV() ? Math.max(fix.sigmaVM(), settings.gnssFloorM()) : 1.5 * sigmaH;
        double rv = sigmaV * sigmaV;
        if (!Double.isFinite(varUpM2)) {
            upM = fixUpM;
            varUpM2 = rv;
            return;
        }
        double gain = varUpM2 / (varUpM2 + rv);
        upM += gain * (fixUpM - upM);
        varUpM2 = (1.0 - gain) * varUpM2;
    }

    /**
     * Until a yaw exists the filter only remembers where the vehicle was. The yaw comes from the GNSS
     * course when the vehicle moves fast enough, else from the displacement between fixes once it
     * exceeds the configured distance while the wheels say the vehicle moves.
     */
    private GnssOutcome.Kind initializeFrom(GnssFix fix, double eastM, double northM, double fixUpM, double var) {
        updateUp(fix, fixUpM, Math.sqrt(var));
        double yaw = Double.NaN;
        double yawVar = Double.NaN;
        double minSpeed = settings.gnssVelocityMinSpeedMps();
        if (fix.hasCourse() && fix.hasSpeed() && fix.speedMps() >= minSpeed
                && Math.abs(wheelSpeedMps) >= MOVING_SPEED_MPS) {
            yaw = Angles.headingDegToYawRad(fix.courseDeg());
            if (wheelSpeedMps < 0.0) {
                yaw = Angles.wrapPi(yaw + Math.PI);
            }
            double sigma = Math.max(settings.initialYawSigmaRad(),
                    Math.toRadians(settings.gnssCourseSigmaDeg()) * minSpeed / fix.speedMps());
            yawVar = sigma * sigma;
        } else if (!Double.isNaN(anchorEastM) && Math.abs(wheelSpeedMps) >= MOVING_SPEED_MPS) {
            double de = eastM - anchorEastM;
            double dn = northM - anchorNorthM;
            double dist = Math.hypot(de, dn);
            double odo = odometerM - anchorOdometerM;
            // The displacement must agree with the wheels' distance, or one of the two fixes is an
            // outlier and the direction between them means nothing: 3 sigma of two fixes plus 20% of
            // the distance for an uncalibrated scale and curved paths.
            boolean agrees = Math.abs(dist - odo) <= 3.0 * Math.sqrt(2.0 * var) + 0.2 * odo;
            if (dist >= settings.headingInitMinDistanceM() && agrees) {
                yaw = Math.atan2(dn, de);
                if (wheelSpeedMps < 0.0) {
                    yaw = Angles.wrapPi(yaw + Math.PI);
                }
                // Two fixes, each with variance var per axis, across dist: the direction's error.
                double sigma = Math.atan2(Math.sqrt(2.0 * var), dist);
                yawVar = Math.max(sigma * sigma, settings.initialYawSigmaRad() * settings.initialYawSigmaRad());
            } else if (!agrees) {
                anchorEastM = Double.NaN;
            }
        }
        if (Double.isNaN(yaw)) {
            if (Double.isNaN(anchorEastM) || Math.abs(wheelSpeedMps) < MOVING_SPEED_MPS) {
                anchorEastM = eastM;
                anchorNorthM = northM;
                anchorOdometerM = odometerM;
            }
            return GnssOutcome.Kind.INITIALIZING;
        }
        double share = settings.gnssCorrelatedShare();
        double corrVar = share * var;
        correlatedVarM2 = corrVar;
        double bias = keptBias();
        double scale = keptScale();
        double biasVar = keptBiasVar();
        double scaleVar = keptScaleVar();
        Arrays.fill(x, 0.0);
        Arrays.fill(p, 0.0);
        // The fix is position + correlated error + white noise; with the error's estimate at zero, the
        // position error is (error + noise) and the error state's error is -(error): their covariance
        // is -sigma_corr^2.
        double c = Math.cos(yaw);
        double s = Math.sin(yaw);
        double fwd = profile.leverArmForwardM();
        double left = profile.leverArmLeftM();
        x[EAST] = eastM - (fwd * c - left * s);
        x[NORTH] = northM - (fwd * s + left * c);
        x[YAW] = Angles.wrapPi(yaw);
        x[GYRO_BIAS] = bias;
        x[SPEED_SCALE] = scale;
        p[EAST * SIZE + EAST] = var;
        p[NORTH * SIZE + NORTH] = var;
        p[EAST * SIZE + GNSS_ERR_EAST] = -corrVar;
        p[GNSS_ERR_EAST * SIZE + EAST] = -corrVar;
        p[NORTH * SIZE + GNSS_ERR_NORTH] = -corrVar;
        p[GNSS_ERR_NORTH * SIZE + NORTH] = -corrVar;
        p[GNSS_ERR_EAST * SIZE + GNSS_ERR_EAST] = corrVar;
        p[GNSS_ERR_NORTH * SIZE + GNSS_ERR_NORTH] = corrVar;
        p[YAW * SIZE + YAW] = yawVar;
        p[GYRO_BIAS * SIZE + GYRO_BIAS] = biasVar;
        p[SPEED_SCALE * SIZE + SPEED_SCALE] = scaleVar;
        initialized = true;
        probation = Probation.NONE;
        pendingCount = 0;
        return GnssOutcome.Kind.INITIALIZING;
    }

    /**
     * Calibration survives a reset when it is plausible: the bias within {@link #PLAUSIBLE_BIAS_RAD_PER_S}
     * and the scale within {@link #PLAUSIBLE_SCALE_ERROR} of 1. Before the first initialisation the
     * state is all zeros and the scale counts as implausible, so the configured priors apply.
     */
    private boolean calibrationPlausible() {
        return Math.abs(x[GYRO_BIAS]) <= PLAUSIBLE_BIAS_RAD_PER_S
                && Math.abs(x[SPEED_SCALE] - 1.0) <= PLAUSIBLE_SCALE_ERROR;
    }

    private double keptBias() {
        return calibrationPlausible() ? x[GYRO_BIAS] : 0.0;
    }

    private double keptScale() {
        return calibrationPlausible() ? x[SPEED_SCALE] : 1.0;
    }

    private double keptBiasVar() {
        double b0 = settings.initialGyroBiasSigmaRadPerS();
        return calibrationPlausible() ? Math.max(p[GYRO_BIAS * SIZE + GYRO_BIAS], 0.0) : b0 * b0;
    }

    private double keptScaleVar() {
        double s0 = settings.initialSpeedScaleSigma();
        return calibrationPlausible() ? Math.max(p[SPEED_SCALE * SIZE + SPEED_SCALE], 0.0) : s0 * s0;
    }

    /**
     * Starts position and yaw afresh from the fixes that follow, keeping a plausible calibration. Used
     * when consecutive agreeing fixes sit so far outside the covariance that the estimate cannot be
     * trusted at all (a wrong initial yaw from an outlier, for example): no correction of such a state
     * is meaningful.
     */
    private void reset(double eastM, double northM) {
        resets++;
        initialized = false;
        probation = Probation.NONE;
        pendingCount = 0;
        anchorEastM = eastM;
        anchorNorthM = northM;
        anchorOdometerM = odometerM;
    }

    /**
     * S = H P H' + R for the first m rows of H; stores PH' in {@code ph}, S^-1 in {@code sInv} and the
     * columns where H has a nonzero entry in {@code hCols}. Zero entries of H are skipped: every H
     * here has at most three nonzeros per row.
     */
    private void innovationCovarianceInverse(int m) {
        positionH = false;
        hColCount = 0;
        for (int l = 0; l < SIZE; l++) {
            if (h[l] != 0.0 || (m == 2 && h[SIZE + l] != 0.0)) {
                hCols[hColCount++] = l;
            }
        }
        // PH' (SIZE x m)
        for (int i = 0; i < SIZE; i++) {
            int row = i * SIZE;
            double a0 = 0.0;
            double a1 = 0.0;
            for (int c = 0; c < hColCount; c++) {
                int l = hCols[c];
                double pil = p[row + l];
                a0 += pil * h[l];
                a1 += pil * h[SIZE + l];
            }
            ph[i * 2] = a0;
            ph[i * 2 + 1] = m == 2 ? a1 : 0.0;
        }
        if (m == 1) {
            double s00 = r[0];
            for (int c = 0; c < hColCount; c++) {
                int l = hCols[c];
                s00 += h[l] * ph[l * 2];
            }
            sInv[0] = 1.0 / s00;
            return;
        }
        // S = H PH' + R (2 x 2), inverted in closed form.
        double s00 = r[0];
        double s01 = r[1];
        double s10 = r[2];
        double s11 = r[3];
        for (int c = 0; c < hColCount; c++) {
            int l = hCols[c];
            s00 += h[l] * ph[l * 2];
            s01 += h[l] * ph[l * 2 + 1];
            s10 += h[SIZE + l] * ph[l * 2];
            s11 += h[SIZE + l] * ph[l * 2 + 1];
        }
        double det = s00 * s11 - s01 * s10;
        sInv[0] = s11 / det;
        sInv[1] = -s01 / det;
        sInv[2] = -s10 / det;
        sInv[3] = s00 / det;
    }

    /**
     * {@link #innovationCovarianceInverse}(2) for the H of a position fix, whose pattern is fixed: row 0
     * is e_EAST + a e_YAW + e_GNSS_ERR_EAST, row 1 is e_NORTH + b e_YAW + e_GNSS_ERR_NORTH. It adds the
     * same nonzero terms in the same order as the general routine (whose skipped terms are products
     * with zero, which add nothing to a finite sum), so the result is the same bit for bit, but with
     * the indices known when compiled: this runs at every fix.
     *
     * @param a H[0][YAW], the east antenna offset's change with yaw (m/rad)
     * @param b H[1][YAW], the north antenna offset's change with yaw (m/rad)
     */
    private void positionCovarianceInverse(double a, double b) {
        positionH = true;
        for (int i = 0; i < SIZE; i++) {
            int row = i * SIZE;
            double pY = p[row + YAW];
            ph[i * 2] = p[row + EAST] + pY * a + p[row + GNSS_ERR_EAST];
            ph[i * 2 + 1] = p[row + NORTH] + pY * b + p[row + GNSS_ERR_NORTH];
        }
        double s00 = r[0] + ph[EAST * 2] + a * ph[YAW * 2] + ph[GNSS_ERR_EAST * 2];
        double s01 = r[1] + ph[EAST * 2 + 1] + a * ph[YAW * 2 + 1] + ph[GNSS_ERR_EAST * 2 + 1];
        double s10 = r[2] + ph[NORTH * 2] + b * ph[YAW * 2] + ph[GNSS_ERR_NORTH * 2];
        double s11 = r[3] + ph[NORTH * 2 + 1] + b * ph[YAW * 2 + 1] + ph[GNSS_ERR_NORTH * 2 + 1];
        double det = s00 * s11 - s01 * s10;
        sInv[0] = s11 / det;
        sInv[1] = -s01 / det;
        sInv[2] = -s10 / det;
        sInv[3] = s00 / det;
    }

    /**
     * Applies an update whose H (first m rows), R, innovation and
     * {@link #innovationCovarianceInverse(int)} are ready, with the gain K = P H' S^-1 and the
     * Joseph-form covariance update.
     */
    private void applyUpdate(int m) {
        // K = P H' S^-1 (SIZE x m)
        for (int i = 0; i < SIZE; i++) {
            if (m == 1) {
                k[i * 2] = ph[i * 2] * sInv[0];
                k[i * 2 + 1] = 0.0;
            } else {
                k[i * 2] = ph[i * 2] * sInv[0] + ph[i * 2 + 1] * sInv[2];
                k[i * 2 + 1] = ph[i * 2] * sInv[1] + ph[i * 2 + 1] * sInv[3];
            }
        }
        // x = x + K nu
        for (int i = 0; i < SIZE; i++) {
            double dx = k[i * 2] * nu[0];
            if (m == 2) {
                dx += k[i * 2 + 1] * nu[1];
            }
            x[i] += dx;
        }
        x[YAW] = Angles.wrapPi(x[YAW]);
        josephUpdate(m);
        checkDiagonal();
    }

    /**
     * P = A P A' + K R K' with A = I - K H, applied in factored form rather than formed: A P = P - K (H P)
     * and (A P) A' = A P - ((A P) H') K'. H has at most three nonzeros per row and K two columns, so
     * this costs about 400 multiplications where two dense 7 x 7 products cost 686, and it keeps the
     * Joseph form's structure (a congruence of P plus K R K'), which holds P symmetric and positive
     * semi-definite for any gain. Only the upper triangle is computed and mirrored: the result is
     * symmetric by construction.
     */
    private void josephUpdate(int m) {
        // HP (m x SIZE) into hp, row by row of P so the inner loop runs along contiguous memory.
        if (positionH) {
            double a = h[YAW];
            double b = h[SIZE + YAW];
            for (int j = 0; j < SIZE; j++) {
                double pY = p[YAW * SIZE + j];
                hp[j] = p[EAST * SIZE + j] + a * pY + p[GNSS_ERR_EAST * SIZE + j];
                hp[SIZE + j] = p[NORTH * SIZE + j] + b * pY + p[GNSS_ERR_NORTH * SIZE + j];
            }
        } else {
            hpGeneral(m);
        }
        josephRest(m);
    }

    /** HP for any H, skipping its zero columns. */
    private void hpGeneral(int m) {
        Arrays.fill(hp, 0.0);
        for (int rIdx = 0; rIdx < m; rIdx++) {
            int out = rIdx * SIZE;
            for (int c = 0; c < hColCount; c++) {
                int l = hCols[c];
                double hrl = h[out + l];
                int row = l * SIZE;
                for (int j = 0; j < SIZE; j++) {
                    hp[out + j] += hrl * p[row + j];
                }
            }
        }
    }

    /** The Joseph update from HP on: A P, (A P) H' and the result. */
    private void josephRest(int m) {
        // tmp = A P = P - K (HP)
        for (int i = 0; i < SIZE; i++) {
            double k0 = k[i * 2];
            double k1 = k[i * 2 + 1];
            for (int j = 0; j < SIZE; j++) {
                tmp[i * SIZE + j] = p[i * SIZE + j] - (k0 * hp[j] + k1 * hp[SIZE + j]);
            }
        }
        // tmpH' (SIZE x 2) into ph: PH' is not needed any more.
        if (positionH) {
            double a = h[YAW];
            double b = h[SIZE + YAW];
            for (int i = 0; i < SIZE; i++) {
                int row = i * SIZE;
                double tY = tmp[row + YAW];
                ph[i * 2] = tmp[row + EAST] + tY * a + tmp[row + GNSS_ERR_EAST];
                ph[i * 2 + 1] = tmp[row + NORTH] + tY * b + tmp[row + GNSS_ERR_NORTH];
            }
        } else {
            for (int i = 0; i < SIZE; i++) {
                double a0 = 0.0;
                double a1 = 0.0;
                for (int c = 0; c < hColCount; c++) {
                    int l = hCols[c];
                    a0 += tmp[i * SIZE + l] * h[l];
                    a1 += tmp[i * SIZE + l] * h[SIZE + l];
                }
                ph[i * 2] = a0;
                ph[i * 2 + 1] = m == 2 ? a1 : 0.0;
            }
        }
        // P = tmp - (tmp H') K' + K R K', upper triangle, mirrored.
        double r00 = r[0];
        double r01 = m == 2 ? r[1] : 0.0;
        double r10 = m == 2 ? r[2] : 0.0;
        double r11 = m == 2 ? r[3] : 0.0;
        for (int i = 0; i < SIZE; i++) {
            double ki0 = k[i * 2];
            double ki1 = k[i * 2 + 1];
            double u0 = ph[i * 2];
            double u1 = ph[i * 2 + 1];
            // Row i of K R
            double kr0 = ki0 * r00 + ki1 * r10;
            double kr1 = ki0 * r01 + ki1 * r11;
            for (int j = i; j < SIZE; j++) {
                double kj0 = k[j * 2];
                double kj1 = k[j * 2 + 1];
                double v = tmp[i * SIZE + j] - (u0 * kj0 + u1 * kj1) + (kr0 * kj0 + kr1 * kj1);
                p[i * SIZE + j] = v;
                p[j * SIZE + i] = v;
            }
        }
    }

    /** Repairs and counts a variance that rounding left non-positive (or NaN). */
    private void checkDiagonal() {
        boolean repaired = false;
        for (int i = 0; i < SIZE; i++) {
            if (!(p[i * SIZE + i] >= 0.0)) {
                p[i * SIZE + i] = 1e-12;
                repaired = true;
            }
        }
        if (repaired) {
            covarianceRepairs++;
        }
    }

    /**
     * P = F P F' for a transition F with {@link MotionModel}'s pattern: the identity except
     * F[east|north][yaw|bias|scale], F[yaw][bias] and the Gauss-Markov decay on the diagonal of the
     * GNSS error states. The product skips the structural zeros (about 200 multiplications instead of
     * 686) but adds the remaining terms in the same order as the dense product, starting from +0.0, and
     * multiplies by the unit diagonal exactly, so the result is the dense one bit for bit.
     *
     * @param f   F, row-major SIZE x SIZE (not modified)
     * @param p   P, row-major SIZE x SIZE (replaced by F P F')
     * @param tmp work array of SIZE x SIZE (overwritten)
     */
    static void predictCovariance(double[] f, double[] p, double[] tmp) {
        double fEY = f[EAST * SIZE + YAW];
        double fEB = f[EAST * SIZE + GYRO_BIAS];
        double fES = f[EAST * SIZE + SPEED_SCALE];
        double fNY = f[NORTH * SIZE + YAW];
        double fNB = f[NORTH * SIZE + GYRO_BIAS];
        double fNS = f[NORTH * SIZE + SPEED_SCALE];
        double fYB = f[YAW * SIZE + GYRO_BIAS];
        double dE = f[GNSS_ERR_EAST * SIZE + GNSS_ERR_EAST];
        double dN = f[GNSS_ERR_NORTH * SIZE + GNSS_ERR_NORTH];
        // tmp = F P, row by row; terms in ascending column order of F (east, north < yaw < bias < scale).
        for (int j = 0; j < SIZE; j++) {
            double pY = p[YAW * SIZE + j];
            double pB = p[GYRO_BIAS * SIZE + j];
            double pS = p[SPEED_SCALE * SIZE + j];
            tmp[EAST * SIZE + j] = 0.0 + p[EAST * SIZE + j] + fEY * pY + fEB * pB + fES * pS;
            tmp[NORTH * SIZE + j] = 0.0 + p[NORTH * SIZE + j] + fNY * pY + fNB * pB + fNS * pS;
            tmp[YAW * SIZE + j] = 0.0 + pY + fYB * pB;
            tmp[GYRO_BIAS * SIZE + j] = 0.0 + pB;
            tmp[SPEED_SCALE * SIZE + j] = 0.0 + pS;
            tmp[GNSS_ERR_EAST * SIZE + j] = 0.0 + dE * p[GNSS_ERR_EAST * SIZE + j];
            tmp[GNSS_ERR_NORTH * SIZE + j] = 0.0 + dN * p[GNSS_ERR_NORTH * SIZE + j];
        }
        // P = tmp F', column by column of the result.
        for (int i = 0; i < SIZE; i++) {
            int row = i * SIZE;
            double tY = tmp[row + YAW];
            double tB = tmp[row + GYRO_BIAS];
            double tS = tmp[row + SPEED_SCALE];
            p[row + EAST] = 0.0 + tmp[row + EAST] + tY * fEY + tB * fEB + tS * fES;
            p[row + NORTH] = 0.0 + tmp[row + NORTH] + tY * fNY + tB * fNB + tS * fNS;
            p[row + YAW] = 0.0 + tY + tB * fYB;
            p[row + GYRO_BIAS] = 0.0 + tB;
            p[row + SPEED_SCALE] = 0.0 + tS;
            p[row + GNSS_ERR_EAST] = 0.0 + tmp[row + GNSS_ERR_EAST] * dE;
            p[row + GNSS_ERR_NORTH] = 0.0 + tmp[row + GNSS_ERR_NORTH] * dN;
        }
    }

    public boolean initialized() {
        return initialized;
    }

    /** Time of the estimate (s since epoch), NaN before the first event. */
    public double tRel() {
        return tRel;
    }

    /** A copy of the state vector, layout {@link StateIndex}. */
    public double[] state() {
        return x.clone();
    }

    /** A copy of the covariance, row-major SIZE x SIZE. */
    public double[] covariance() {
        return p.clone();
    }

    /** The chi-square gate applied to fixes (unitless). */
    public double gateThreshold() {
        return gateThreshold;
    }

    /** An immutable copy of the current estimate. */
    public FilterSnapshot snapshot() {
        double speed = x[SPEED_SCALE] * wheelSpeedMps;
        double rate = standstill || !hasYawRate ? 0.0 : yawRateRadPerS - x[GYRO_BIAS];
        return new FilterSnapshot(tRel, initialized, x[EAST], x[NORTH], Double.isFinite(varUpM2) ? upM : 0.0,
                x[YAW], x[GYRO_BIAS], initialized ? x[SPEED_SCALE] : 1.0, x[GNSS_ERR_EAST], x[GNSS_ERR_NORTH],
                p[EAST * SIZE + EAST], p[EAST * SIZE + NORTH], p[NORTH * SIZE + NORTH], p[YAW * SIZE + YAW],
                p[GYRO_BIAS * SIZE + GYRO_BIAS], p[SPEED_SCALE * SIZE + SPEED_SCALE],
                Double.isFinite(varUpM2) ? varUpM2 : Double.NaN, initialized ? speed : wheelSpeedMps, rate,
                standstill, odometerM, lastUsedFixTRel, lastFixTRel,
                lastKind == null ? null : outcome(lastKind, lastNis), odometerAtLastUsedFixM,
                new FilterCounts(fixesUsed, fixesGated, fixesPending, fixesDropped, fixesUnusable, velocityGated,
                        covarianceRepairs, resets));
    }
}
