package org.wayhold.filter;

import static org.wayhold.filter.StateIndex.EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_EAST;
import static org.wayhold.filter.StateIndex.GNSS_ERR_NORTH;
import static org.wayhold.filter.StateIndex.GNSS_LATENCY;
import static org.wayhold.filter.StateIndex.GYRO_BIAS;
import static org.wayhold.filter.StateIndex.GYRO_SCALE;
import static org.wayhold.filter.StateIndex.LEVER_FORWARD;
import static org.wayhold.filter.StateIndex.LEVER_LEFT;
import static org.wayhold.filter.StateIndex.NORTH;
import static org.wayhold.filter.StateIndex.SIZE;
import static org.wayhold.filter.StateIndex.SPEED_SCALE;
import static org.wayhold.filter.StateIndex.YAW;

import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;
import org.wayhold.filter.FilterState.Slot;
import org.wayhold.geo.Angles;
import org.wayhold.sample.FixType;
import org.wayhold.sample.GnssFix;
import org.wayhold.settings.FilterSettings;
import org.wayhold.settings.GatingSettings;
import org.wayhold.settings.OutageSettings;
import org.wayhold.settings.VehicleProfile;

/**
 * The extended Kalman filter of one vehicle: wheel speed and yaw rate drive the prediction, GNSS
 * fixes correct it. This class only orchestrates; each job has its own part:
 * <ul>
 *   <li>{@link FilterState}: everything the filter knows and remembers, copied and written as one;</li>
 *   <li>{@link MotionModel} and {@link ProcessNoise}: the vehicle model (prediction, Jacobians, Q);
 *       {@link CovariancePrediction}: P = F P F'; {@link InputHold}: inputs between readings;</li>
 *   <li>{@link JosephUpdate}: gain and Joseph-form correction; the measurement models
 *       {@link PositionFix}, {@link CourseSpeed}, {@link ZeroRate} supply h, H and R;
 *       {@link GnssNoise}: how much a fix is believed; {@link HeightChannel}: the height;</li>
 *   <li>the decisions: {@link Standstill} (standstill or creeping), {@link Alignment} (initial yaw,
 *       resets), {@link Reacquisition} (gating, agreement after gaps, jumps), {@link FixConsistency}
 *       (fixes against the odometry), {@link InnovationMonitor} (sustained disagreement).</li>
 * </ul>
 *
 * <p>Events must arrive in time order (the {@code ordering} package sees to that). Each event first
 * calls {@link #predictTo(double)} with its time. Times are seconds relative to the session epoch.
 *
 * <p>Instances are mutable and not thread-safe: one writer per vehicle. {@link #copy()},
 * {@link #saveState()} and {@link #restore(FilterState)} take and return to checkpoints.
 */
public final class NavigationFilter {

    /** Steps longer than this are split, so the linearised covariance stays close (s). */
    private static final double MAX_STEP_S = 0.1;
    /** Readings beyond these are no vehicle's: refused rather than let into the state (m/s, rad/s). */
    private static final double MAX_WHEEL_SPEED_MPS = 150.0;
    private static final double MAX_YAW_RATE_RAD_PER_S = 10.0;
    /**
     * Time constant of the speed the wheel-speed scale is taken to be learnt at (s): GNSS fixes bring
     * the scale to the speeds of about the last minute.
     */
    private static final double SCALE_REFERENCE_TIME_S = 60.0;
    /**
     * Held fixes that keep disagreeing for this long mean the estimate itself is off (a heading that
     * went wrong while creeping, say): position and yaw are widened so the fixes can agree (s).
     */
    private static final double REACQUIRE_PATIENCE_S = 10.0;
    private static final double PATIENCE_WIDENING = 4.0;
    /** A fix whose sigma its geometry raised by more than this factor is reported as weak. */
    private static final double WEAK_FIX_FACTOR = 1.2;
    /** Reasons about a widening, an inconsistency or weak fixes are shown this long after it (s). */
    private static final double REASON_HOLD_S = 30.0;
    /** Calibration is taken as converged below these 1-sigma values (common practice). */
    private static final double CALIBRATED_BIAS_RAD_PER_S = Math.toRadians(0.05);
    private static final double CALIBRATED_SCALE = 0.005;
    /** Smallest disagreement with the configured lever arm (m) and latency (s) that is reported. */
    private static final double SUSPECTED_LEVER_M = 0.3;
    private static final double SUSPECTED_LATENCY_S = 0.03;

    private final FilterSettings settings;
    private final GatingSettings gating;
    private final OutageSettings outage;
    private final VehicleProfile profile;

    private final GnssNoise gnssNoise;
    private final ProcessNoise processNoise;
    private final CourseSpeed courseSpeed;
    private final ZeroRate zeroRate;
    private final HeightChannel height;
    private final Standstill standstill;
    private final Alignment alignment;
    private final Reacquisition reacquisition;
    private final FixConsistency consistency;
    private final JosephUpdate update = new JosephUpdate();

    private final FilterState s;
    /** The forward pass kept for smoothing, null unless {@link #recordForSmoothing()} was called. */
    private SmootherLog smoothing;

    // Work arrays of the prediction, allocated once so a step allocates nothing.
    private final double[] xNext = new double[SIZE];
    private final double[] f = new double[SIZE * SIZE];
    private final double[] tmp = new double[SIZE * SIZE];
    private final double[] inputJac = new double[6];
    /**
     * exp(-dt / tau) of the last step length {@link #decayDtS}: at a steady input rate every step has
     * the same length, and the exponential is a visible share of a step. A cache, not state.
     */
    private double decayDtS = Double.NaN;
    private double decayForDt;

    public NavigationFilter(FilterSettings settings, GatingSettings gating, OutageSettings outage,
                            VehicleProfile profile) {
        this.settings = settings;
        this.gating = gating;
        this.outage = outage;
        this.profile = profile;
        this.gnssNoise = new GnssNoise(settings);
        this.processNoise = new ProcessNoise(settings);
        this.courseSpeed = new CourseSpeed(settings);
        this.zeroRate = new ZeroRate(settings);
        this.height = new HeightChannel(settings, profile);
        this.standstill = new Standstill(settings);
        this.alignment = new Alignment(settings, profile, gnssNoise);
        this.reacquisition = new Reacquisition(gating, outage, settings.gnssCorrelationTimeS());
        this.consistency = new FixConsistency(settings.gnssCorrelationTimeS());
        this.s = new FilterState(reacquisition.reacquireFixes());
        s.set(Slot.CORRELATED_VAR_M2, gnssNoise.defaultCorrelatedVarM2());
    }

    /** A deep copy that can run on its own (branches, such as a drive survey's outage windows). */
    public NavigationFilter copy() {
        NavigationFilter c = new NavigationFilter(settings, gating, outage, profile);
        c.s.restore(s);
        return c;
    }

    /**
     * A copy of the state alone, for checkpoints that are only restored from or written: a fraction of
     * a whole filter's memory.
     */
    public FilterState saveState() {
        return s.copy();
    }

    /** Makes this filter's state an exact copy of {@code saved}, taken from a filter with the same settings. */
    public void restore(FilterState saved) {
        s.restore(saved);
        if (smoothing != null) {
            smoothing.rewind();
        }
    }

    /** Makes this filter an exact copy of {@code o}, which must share its settings. */
    public void restore(NavigationFilter o) {
        s.restore(o.s);
        if (smoothing != null) {
            smoothing.rewind();
        }
    }

    /**
     * Starts keeping the forward pass for the Rauch-Tung-Striebel smoother: from now on the steps and
     * updates of this filter are recorded between the nodes the caller takes with
     * {@link SmootherLog#mark()}. Copies of this filter do not record.
     *
     * @return the log, to mark nodes in and to hand to {@link RtsSmoother#smooth} once finished
     * @throws IllegalStateException when this filter already records
     */
    public SmootherLog recordForSmoothing() {
        if (smoothing != null) {
            throw new IllegalStateException("this filter already records for smoothing");
        }
        smoothing = new SmootherLog(s);
        update.smoothing = smoothing;
        return smoothing;
    }

    /** An empty state of this filter's layout, to {@link #readState} into. */
    public FilterState emptyState() {
        return new FilterState(reacquisition.reacquireFixes());
    }

    /**
     * Writes a state, bit for bit, for snapshots that must restore a filter exactly. The settings are
     * not written: reading needs a filter built with the same settings.
     */
    public static void writeState(FilterState state, DataOutput out) throws IOException {
        state.write(out);
    }

    /**
     * Reads what {@link #writeState} wrote.
     *
     * @throws IOException when the data is not a filter state of this layout
     */
    public FilterState readState(DataInput in) throws IOException {
        FilterState read = emptyState();
        read.read(in);
        return read;
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
        System.arraycopy(state, 0, s.x, 0, SIZE);
        System.arraycopy(cov, 0, s.p, 0, SIZE * SIZE);
        s.set(Slot.T_REL, tRelS);
        s.set(Slot.INITIALIZED, true);
        s.set(Slot.LAST_USED_FIX_T_REL, tRelS);
        s.set(Slot.ODOMETER_AT_LAST_USED_FIX_M, s.get(Slot.ODOMETER_M));
    }

    /**
     * Propagates the state to {@code tRelS} with the inputs held as {@link InputHold} describes, in
     * steps of at most {@link #MAX_STEP_S}.
     *
     * @param tRelS time (s since epoch), not before the current time
     */
    public void predictTo(double tRelS) {
        double now = s.get(Slot.T_REL);
        if (Double.isNaN(now)) {
            s.set(Slot.T_REL, tRelS);
            return;
        }
        double dt = tRelS - now;
        if (dt < 0.0) {
            throw new IllegalStateException("time went back by " + (-dt) + " s: samples must be ordered");
        }
        double from = now;
        while (dt > 0.0) {
            double step = Math.min(dt, MAX_STEP_S);
            s.set(Slot.T_REL, from);
            propagate(step, from + 0.5 * step);
            from += step;
            dt -= step;
        }
        s.set(Slot.T_REL, tRelS);
    }

    private void propagate(double dt, double tMidRel) {
        double[] x = s.x;
        double wheel = InputHold.wheelSpeedAt(s, tMidRel);
        double rate = InputHold.yawRateAt(s, tMidRel);
        boolean initialized = s.is(Slot.INITIALIZED);
        double scale = initialized ? x[SPEED_SCALE] : alignment.keptScale(s);
        double creepSigma = 0.0;
        if (s.is(Slot.CREEPING) && initialized) {
            // The wheels read zero but the vehicle turns, so it moves below the sensor's threshold.
            double omega = x[GYRO_SCALE] * (rate - x[GYRO_BIAS]);
            wheel = s.get(Slot.LAST_MOVING_SIGN) * standstill.creepSpeedMps(omega) / scale;
            creepSigma = standstill.creepSpeedSigmaMps(omega);
        }
        s.set(Slot.ODOMETER_M, s.get(Slot.ODOMETER_M) + Math.abs(scale * wheel) * dt);
        s.set(Slot.WHEEL_DISTANCE_M, s.get(Slot.WHEEL_DISTANCE_M) + wheel * dt);
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
        boolean atRest = s.is(Slot.STANDSTILL);
        if (smoothing != null) {
            smoothing.beforeStep();
        }
        MotionModel.step(x, wheel, rate, dt, atRest, decay, xNext, f, inputJac);
        s.set(Slot.ODOMETRY_EAST_M, s.get(Slot.ODOMETRY_EAST_M) + (xNext[EAST] - x[EAST]));
        s.set(Slot.ODOMETRY_NORTH_M, s.get(Slot.ODOMETRY_NORTH_M) + (xNext[NORTH] - x[NORTH]));
        System.arraycopy(xNext, 0, x, 0, SIZE);
        x[YAW] = Angles.wrapPi(x[YAW]);
        // P = F P F' + Q
        CovariancePrediction.predict(f, s.p, tmp);
        double omega = atRest ? 0.0 : x[GYRO_SCALE] * (rate - x[GYRO_BIAS]);
        double speed = x[SPEED_SCALE] * wheel;
        double ref = s.get(Slot.SCALE_REFERENCE_SPEED_MPS);
        s.set(Slot.SCALE_REFERENCE_SPEED_MPS, ref + (Math.abs(speed) - ref) * Math.min(dt / SCALE_REFERENCE_TIME_S, 1.0));
        processNoise.add(s, inputJac, dt, speed, omega, creepSigma, ref, decay);
        height.predict(s, dt);
        if (smoothing != null) {
            smoothing.afterStep(f);
        }
    }

    /** Holds a new wheel speed from now on (m/s, signed). Call after {@link #predictTo}. */
    public void setWheelSpeed(double speedMps) {
        if (!(Math.abs(speedMps) <= MAX_WHEEL_SPEED_MPS)) {
            s.increment(FilterCounter.INPUTS_REFUSED);
            return;
        }
        InputHold.recordWheelSpeed(s, speedMps);
        standstill.onWheelSpeed(s);
    }

    /**
     * Holds a new yaw rate from now on (rad/s, counter-clockwise positive). Call after
     * {@link #predictTo}. While the wheels read zero, {@link Standstill} decides whether the reading
     * confirms a standstill (then it observes the gyro bias, {@link ZeroRate}) or shows a creep.
     */
    public void setYawRate(double rateRadPerS) {
        if (!(Math.abs(rateRadPerS) <= MAX_YAW_RATE_RAD_PER_S)) {
            s.increment(FilterCounter.INPUTS_REFUSED);
            return;
        }
        InputHold.recordYawRate(s, rateRadPerS);
        boolean initialized = s.is(Slot.INITIALIZED);
        double nis = initialized && wheelsAtRest() ? zeroRate.prepare(s, update, rateRadPerS) : Double.NaN;
        if (standstill.onYawRate(s, nis) && initialized) {
            update.apply(s, 1);
        }
    }

    private boolean wheelsAtRest() {
        return Math.abs(s.get(Slot.WHEEL_SPEED_MPS)) < Standstill.ZERO_SPEED_MPS
                && s.get(Slot.T_REL) - s.get(Slot.ZERO_SPEED_SINCE_T_REL) >= settings.standstillAfterS();
    }

    /**
     * The 1-sigma horizontal error per axis the filter assumes for a fix (m); see {@link GnssNoise}.
     */
    public double horizontalSigmaM(GnssFix fix) {
        return gnssNoise.horizontalSigmaM(fix);
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
    public GnssOutcome updateGnss(GnssFix fix, double eastM, double northM, double upM) {
        GnssOutcome.Kind kind = correct(fix, eastM, northM, upM);
        return outcome(kind, s.get(Slot.LAST_NIS));
    }

    /**
     * As {@link #updateGnss} but returns only the decision, allocating nothing: the hot path of
     * replays. The normalised innovation squared is {@link #lastNis()}.
     */
    /** 2-dof chi-square quantile at 0.95 (NIST/SEMATECH e-Handbook 1.3.6.7.4: 5.991). */
    static final double REACQUIRE_WIDEN_NIS = ChiSquare.quantile2Dof(0.95);

    public GnssOutcome.Kind correct(GnssFix fix, double eastM, double northM, double upM) {
        s.set(Slot.LAST_FIX_T_REL, s.get(Slot.T_REL));
        s.set(Slot.LAST_NIS, Double.NaN);
        s.set(Slot.LAST_LOG_DET_S, Double.NaN);
        GnssOutcome.Kind kind = decideGnss(fix, eastM, northM, upM);
        s.set(Slot.LAST_KIND, kind.ordinal());
        switch (kind) {
            case ACCEPTED, REACQUIRED, INITIALIZING -> {
                s.increment(FilterCounter.FIXES_USED);
                s.set(Slot.LAST_USED_FIX_T_REL, s.get(Slot.T_REL));
                s.set(Slot.ODOMETER_AT_LAST_USED_FIX_M, s.get(Slot.ODOMETER_M));
            }
            case GATED -> s.increment(FilterCounter.FIXES_GATED);
            case PENDING -> s.increment(FilterCounter.FIXES_PENDING);
            case UNUSABLE -> s.increment(FilterCounter.FIXES_UNUSABLE);
            default -> throw new IllegalStateException("unhandled outcome " + kind);
        }
        return kind;
    }

    private GnssOutcome.Kind decideGnss(GnssFix fix, double eastM, double northM, double upM) {
        if (fix.fix() == FixType.NONE) {
            return GnssOutcome.Kind.UNUSABLE;
        }
        double sigma = gnssNoise.horizontalSigmaM(fix);
        double var = sigma * sigma;
        if (!s.is(Slot.INITIALIZED)) {
            height.update(s, fix, upM, sigma);
            s.set(Slot.ANCHOR_VAR_M2, var);
            return alignment.align(s, fix, eastM, northM, var);
        }
        // Whether the estimate agrees with the fix as the fix claims itself to be, before any doubt
        // the consistency test adds.
        double plainNis = PositionFix.innovation(s.x, s.p, s.get(Slot.WHEEL_SPEED_MPS), update, eastM, northM,
                gnssNoise.whiteVarM2(var));
        double extra = consistency.extraVarianceM2(s, eastM, northM, gnssNoise.whiteVarM2(var),
                gnssNoise.correlatedVarM2(var), plainNis <= reacquisition.gateThreshold());
        s.set(Slot.FIX_WEAK, extra > 0.0 || sigma > WEAK_FIX_FACTOR * reportedSigmaM(fix));
        // The doubt goes to this fix alone, never to the correlated error states: a disagreement they
        // were allowed to hold would be parked there instead of showing in the position's covariance.
        s.set(Slot.CORRELATED_VAR_M2, gnssNoise.correlatedVarM2(var));
        double whiteVar = gnssNoise.whiteVarM2(var) + extra;
        height.update(s, fix, upM, sigma);
        double t = s.get(Slot.T_REL);
        double wheel = s.get(Slot.WHEEL_SPEED_MPS);
        // The NIS at the accuracy the fix claims decides how far a jump is; the NIS with the doubt the
        // consistency test added decides whether the fix may correct the state through the gate.
        double claimedWhiteVar = gnssNoise.whiteVarM2(var);
        boolean fault = reacquisition.sameFault(s, eastM, northM, whiteVar);
        // Patience is for fixes the estimate may have drifted from, not for fixes that sit where
        // remembered faulty ones sat: widening for those would only let the fault in.
        if (Reacquisition.inProbation(s) && t - s.get(Slot.PROBATION_SINCE_T_REL) > REACQUIRE_PATIENCE_S
                && !(t - s.get(Slot.WIDENED_T_REL) <= REACQUIRE_PATIENCE_S) && !fault) {
            InnovationMonitor.widen(s, PATIENCE_WIDENING);
        }
        double claimedNis = PositionFix.innovation(s.x, s.p, wheel, update, eastM, northM, claimedWhiteVar);
        if (s.is(Slot.FIX_FAILED) && claimedNis > reacquisition.gateThreshold()) {
            reacquisition.rememberFault(s, eastM, northM, update.nu[0], update.nu[1], var);
        }
        double nis = PositionFix.innovation(s.x, s.p, wheel, update, eastM, northM, whiteVar);
        s.set(Slot.LAST_NIS, nis);
        s.set(Slot.LAST_LOG_DET_S, update.logDetS());
        double nuEast = update.nu[0];
        double nuNorth = update.nu[1];
        Reacquisition.Verdict verdict = reacquisition.decide(s, nuEast, nuNorth, nis, claimedNis, var, fault,
                Alignment.calibrationPlausible(s), !s.is(Slot.FIX_FAILED));
        double omega = s.is(Slot.STANDSTILL) ? 0.0
                : s.x[GYRO_SCALE] * (s.get(Slot.YAW_RATE_RAD_PER_S) - s.x[GYRO_BIAS]);
        switch (verdict) {
            case ACCEPT -> {
                if (!FixConsistency.mayCorrect(s, extra, claimedWhiteVar)) {
                    return GnssOutcome.Kind.GATED;
                }
                PositionFix.freezeUnobservable(update, omega, s.x[SPEED_SCALE] * wheel);
                if (!update.apply(s, 2)) {
                    return GnssOutcome.Kind.GATED;
                }
                InnovationMonitor.record(s, nis);
                if (extra == 0.0) {
                    // While the fixes are in doubt, a correlated error estimate that grows with them says
                    // the fixes are off, which is known, not that the position drifted.
                    InnovationMonitor.checkGnssError(s);
                }
            }
            case REACQUIRE -> {
                // Fixes that agree with each other and with the odometry are taken at the accuracy they
                // claim: an earlier doubt must not hide the jump they reveal from the covariance.
                FixConsistency.forgive(s);
                whiteVar = claimedWhiteVar;
                // Held fixes that agree with each other over seconds and sit beyond the estimate's 95 %
                // ellipse say the estimate is off, not that they are: the covariance is moved to cover
                // the whole jump before they correct it, or the update would only go part of the way
                // while shrinking the covariance as if the rest were noise.
                if (claimedNis > REACQUIRE_WIDEN_NIS) {
                    Reacquisition.widenForJump(s, nuEast, nuNorth,
                            s.get(Slot.ODOMETER_M) - s.get(Slot.ODOMETER_AT_LAST_USED_FIX_M));
                }
                PositionFix.innovation(s.x, s.p, wheel, update, eastM, northM, whiteVar);
                PositionFix.freezeUnobservable(update, omega, s.x[SPEED_SCALE] * wheel);
                if (!update.apply(s, 2)) {
                    return GnssOutcome.Kind.GATED;
                }
                InnovationMonitor.clear(s);
            }
            case RESET -> {
                alignment.reset(s, eastM, northM);
                Reacquisition.resolveFault(s);
                InnovationMonitor.clear(s);
                FixConsistency.clear(s);
                return GnssOutcome.Kind.INITIALIZING;
            }
            case PENDING -> {
                return GnssOutcome.Kind.PENDING;
            }
            case GATED -> {
                return GnssOutcome.Kind.GATED;
            }
            default -> throw new IllegalStateException("unhandled verdict " + verdict);
        }
        if (whiteVar == claimedWhiteVar) {
            s.set(Slot.LAST_TRUSTED_FIX_T_REL, s.get(Slot.T_REL));
        }
        if (!s.is(Slot.FIX_FAILED)) {
            Reacquisition.resolveFault(s);
        }
        courseSpeed.update(s, update, fix, reacquisition.gateThreshold());
        consistency.record(s, eastM, northM, whiteVar);
        return verdict == Reacquisition.Verdict.ACCEPT ? GnssOutcome.Kind.ACCEPTED : GnssOutcome.Kind.REACQUIRED;
    }

    /** The sigma a fix reports for itself, scaled by its type (m), before any floor. */
    private double reportedSigmaM(GnssFix fix) {
        return fix.hasSigmaH() ? fix.sigmaHM() * settings.fixScale(fix.fix()) : 0.0;
    }

    /** Normalised innovation squared of the last fix's position (unitless), NaN when not computed. */
    public double lastNis() {
        return s.get(Slot.LAST_NIS);
    }

    /**
     * ln det S of the last fix's position innovation covariance S = H P H' + R (ln m^4), NaN when not
     * computed; S is the covariance before any widening a reacquisition applies. With {@link #lastNis()}
     * it gives the fix's term of the innovation log-likelihood, -(2 ln 2 pi + ln det S + NIS) / 2.
     */
    public double lastLogDetS() {
        return s.get(Slot.LAST_LOG_DET_S);
    }

    /** Whether the newest fix disagreed with the odometry's path since the trail's fixes. */
    boolean lastFixDisagreed() {
        return s.is(Slot.FIX_FAILED);
    }

    private GnssOutcome outcome(GnssOutcome.Kind kind, double nis) {
        return new GnssOutcome(kind, nis, Double.isNaN(nis) ? Double.NaN : reacquisition.gateThreshold());
    }

    public boolean initialized() {
        return s.is(Slot.INITIALIZED);
    }

    /** Time of the estimate (s since epoch), NaN before the first event. */
    public double tRel() {
        return s.get(Slot.T_REL);
    }

    /** A copy of the state vector, layout {@link StateIndex}. */
    public double[] state() {
        return s.x.clone();
    }

    /** A copy of the covariance, row-major SIZE x SIZE. */
    public double[] covariance() {
        return s.p.clone();
    }

    /** The chi-square gate applied to fixes (unitless). */
    public double gateThreshold() {
        return reacquisition.gateThreshold();
    }

    /** The filter's cautions now, a set of {@link Reason} bits. */
    private int reasons() {
        int r = 0;
        double t = s.get(Slot.T_REL);
        boolean hasWheel = s.is(Slot.HAS_WHEEL_SPEED);
        boolean hasRate = s.is(Slot.HAS_YAW_RATE);
        if (!hasWheel || !hasRate) {
            r |= Reason.ODOMETRY_MISSING.bit();
        }
        if ((hasWheel && processNoise.wheelGapS(s, t) > 0.0) || (hasRate && processNoise.yawRateGapS(s, t) > 0.0)) {
            r |= Reason.ODOMETRY_INTERRUPTED.bit();
        }
        if (s.is(Slot.CREEPING)) {
            r |= Reason.CREEPING.bit();
        }
        if (!s.is(Slot.INITIALIZED)) {
            return r | Reason.HEADING_UNKNOWN.bit();
        }
        if (t - s.get(Slot.INCONSISTENT_T_REL) <= REASON_HOLD_S
                && s.get(Slot.INCONSISTENCY_VAR_M2) > FixConsistency.REPORTED_VAR_M2) {
            r |= Reason.FIXES_INCONSISTENT.bit();
        }
        if (s.is(Slot.FIX_WEAK) && t - s.get(Slot.LAST_FIX_T_REL) <= outage.gapS()) {
            r |= Reason.FIX_QUALITY_POOR.bit();
        }
        if (t - s.get(Slot.WIDENED_T_REL) <= REASON_HOLD_S) {
            r |= Reason.COVARIANCE_WIDENED.bit();
        }
        double[] x = s.x;
        double[] p = s.p;
        if (variance(p, GYRO_BIAS) > CALIBRATED_BIAS_RAD_PER_S * CALIBRATED_BIAS_RAD_PER_S
                || variance(p, SPEED_SCALE) > CALIBRATED_SCALE * CALIBRATED_SCALE
                || variance(p, GYRO_SCALE) > CALIBRATED_SCALE * CALIBRATED_SCALE) {
            r |= Reason.CALIBRATING.bit();
        }
        if (suspect(x, p, LEVER_FORWARD, SUSPECTED_LEVER_M) || suspect(x, p, LEVER_LEFT, SUSPECTED_LEVER_M)) {
            r |= Reason.ANTENNA_OFFSET_SUSPECTED.bit();
        }
        if (suspect(x, p, GNSS_LATENCY, SUSPECTED_LATENCY_S)) {
            r |= Reason.LATENCY_SUSPECTED.bit();
        }
        return r;
    }

    private static double variance(double[] p, int i) {
        return Math.max(p[i * SIZE + i], 0.0);
    }

    /** True when a state has moved from its configured value by more than 3 sigma and {@code least}. */
    private boolean suspect(double[] x, double[] p, int i, double least) {
        double off = Math.abs(x[i] - alignment.prior(i));
        return off > least && off > 3.0 * Math.sqrt(variance(p, i));
    }

    /** A copy of the running counts alone: what metrics read, without building a whole snapshot. */
    public FilterCounts counts() {
        return s.counts();
    }

    /** An immutable copy of the current estimate. */
    public FilterSnapshot snapshot() {
        double[] x = s.x;
        double[] p = s.p;
        boolean initialized = s.is(Slot.INITIALIZED);
        boolean atRest = s.is(Slot.STANDSTILL);
        double wheel = s.get(Slot.WHEEL_SPEED_MPS);
        double rate = atRest || !s.is(Slot.HAS_YAW_RATE) ? 0.0
                : x[GYRO_SCALE] * (s.get(Slot.YAW_RATE_RAD_PER_S) - x[GYRO_BIAS]);
        double east = x[EAST];
        double north = x[NORTH];
        double ee = p[EAST * SIZE + EAST];
        double en = p[EAST * SIZE + NORTH];
        double nn = p[NORTH * SIZE + NORTH];
        if (!initialized) {
            // No state yet: the newest fix and its accuracy, or nothing.
            east = s.get(Slot.ANCHOR_EAST_M);
            north = s.get(Slot.ANCHOR_NORTH_M);
            double v = Double.isNaN(east) ? Double.NaN : s.get(Slot.ANCHOR_VAR_M2);
            ee = v;
            en = Double.isNaN(v) ? Double.NaN : 0.0;
            nn = v;
        }
        GnssOutcome.Kind lastKind = s.lastKind();
        double varUp = s.get(Slot.VAR_UP_M2);
        return new FilterSnapshot(s.get(Slot.T_REL), initialized, east, north,
                Double.isFinite(varUp) ? s.get(Slot.UP_M) : 0.0, x[YAW], x[GYRO_BIAS],
                initialized ? x[SPEED_SCALE] : alignment.prior(SPEED_SCALE),
                initialized ? x[GYRO_SCALE] : alignment.prior(GYRO_SCALE), x[GNSS_ERR_EAST], x[GNSS_ERR_NORTH],
                initialized ? x[LEVER_FORWARD] : alignment.prior(LEVER_FORWARD),
                initialized ? x[LEVER_LEFT] : alignment.prior(LEVER_LEFT),
                initialized ? x[GNSS_LATENCY] : alignment.prior(GNSS_LATENCY), ee, en, nn,
                initialized ? p[YAW * SIZE + YAW] : Double.NaN, p[GYRO_BIAS * SIZE + GYRO_BIAS],
                p[SPEED_SCALE * SIZE + SPEED_SCALE], p[GYRO_SCALE * SIZE + GYRO_SCALE],
                Double.isFinite(varUp) ? varUp : Double.NaN,
                initialized ? x[SPEED_SCALE] * wheel : wheel, rate, atRest, s.get(Slot.ODOMETER_M),
                s.get(Slot.LAST_USED_FIX_T_REL), s.get(Slot.LAST_FIX_T_REL),
                lastKind == null ? null : outcome(lastKind, s.get(Slot.LAST_NIS)),
                s.get(Slot.ODOMETER_AT_LAST_USED_FIX_M), reasons(), s.counts());
    }
}
