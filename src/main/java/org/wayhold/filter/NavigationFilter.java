package org.wayhold.filter;

import org.wayhold.filter.FilterState.Slot;

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
 *   <li>the decisions: {@link Standstill}, {@link Alignment} (initial yaw, resets),
 *       {@link Reacquisition} (gating and agreement after gaps).</li>
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

    private final FilterSettings settings;
    private final GatingSettings gating;
    private final OutageSettings outage;
    private final VehicleProfile profile;

    private final GnssNoise gnssNoise;
    private final ProcessNoise processNoise;
    private final PositionFix position;
    private final CourseSpeed courseSpeed;
    private final ZeroRate zeroRate;
    private final HeightChannel height;
    private final Standstill standstill;
    private final Alignment alignment;
    private final Reacquisition reacquisition;
    private final JosephUpdate update = new JosephUpdate();

    private final FilterState s;

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
        this.position = new PositionFix(profile);
        this.courseSpeed = new CourseSpeed(settings, profile);
        this.zeroRate = new ZeroRate(settings);
        this.height = new HeightChannel(settings, profile);
        this.standstill = new Standstill(settings);
        this.alignment = new Alignment(settings, gnssNoise, position);
        this.reacquisition = new Reacquisition(gating, outage, settings.gnssCorrelationTimeS());
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
    }

    /** Makes this filter an exact copy of {@code o}, which must share its settings. */
    public void restore(NavigationFilter o) {
        s.restore(o.s);
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
        if (Double.isNaN(s.get(Slot.T_REL))) {
            s.set(Slot.T_REL, tRelS);
            return;
        }
        double dt = tRelS - s.get(Slot.T_REL);
        if (dt < 0.0) {
            throw new IllegalStateException("time went back by " + (-dt) + " s: samples must be ordered");
        }
        double from = s.get(Slot.T_REL);
        while (dt > 0.0) {
            double step = Math.min(dt, MAX_STEP_S);
            propagate(step, from + 0.5 * step);
            from += step;
            dt -= step;
        }
        s.set(Slot.T_REL, tRelS);
    }

    private void propagate(double dt, double tMidRel) {
        double wheel = InputHold.wheelSpeedAt(s, tMidRel);
        double rate = InputHold.yawRateAt(s, tMidRel);
        s.set(Slot.ODOMETER_M, s.get(Slot.ODOMETER_M) + (Math.abs((s.is(Slot.INITIALIZED) ? s.x[SPEED_SCALE] : Alignment.keptScale(s)) * wheel) * dt));
        if (!s.is(Slot.INITIALIZED)) {
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
        MotionModel.step(s.x, wheel, rate, dt, s.is(Slot.STANDSTILL), decay, xNext, f, inputJac);
        System.arraycopy(xNext, 0, s.x, 0, SIZE);
        s.x[YAW] = Angles.wrapPi(s.x[YAW]);
        // P = F P F' + Q
        CovariancePrediction.predict(f, s.p, tmp);
        processNoise.add(s.p, inputJac, dt, s.is(Slot.STANDSTILL), decay, s.get(Slot.CORRELATED_VAR_M2));
        height.predict(s, dt);
    }

    /** Holds a new wheel speed from now on (m/s, signed). Call after {@link #predictTo}. */
    public void setWheelSpeed(double speedMps) {
        InputHold.recordWheelSpeed(s, speedMps);
        standstill.onWheelSpeed(s);
    }

    /**
     * Holds a new yaw rate from now on (rad/s, counter-clockwise positive). Call after
     * {@link #predictTo}. At a standstill the reading observes the gyro bias ({@link ZeroRate}).
     */
    public void setYawRate(double rateRadPerS) {
        InputHold.recordYawRate(s, rateRadPerS);
        standstill.onYawRate(s);
        if (s.is(Slot.INITIALIZED) && s.is(Slot.STANDSTILL)) {
            zeroRate.update(s, update, rateRadPerS);
        }
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
    public GnssOutcome.Kind correct(GnssFix fix, double eastM, double northM, double upM) {
        s.set(Slot.LAST_FIX_T_REL, s.get(Slot.T_REL));
        s.set(Slot.LAST_NIS, Double.NaN);
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
            height.update(s, fix, upM, Math.sqrt(var));
            return alignment.align(s, fix, eastM, northM, var);
        }
        s.set(Slot.CORRELATED_VAR_M2, gnssNoise.correlatedVarM2(var));
        double whiteVar = gnssNoise.whiteVarM2(var);
        height.update(s, fix, upM, sigma);
        double nis = position.innovation(s, update, eastM, northM, whiteVar);
        s.set(Slot.LAST_NIS, nis);
        Reacquisition.Verdict verdict = reacquisition.decide(s, update.nu[0], update.nu[1], nis, whiteVar,
                Alignment.calibrationPlausible(s));
        return switch (verdict) {
            case ACCEPT -> {
                update.apply(s, 2);
                courseSpeed.update(s, update, fix, reacquisition.gateThreshold());
                yield GnssOutcome.Kind.ACCEPTED;
            }
            case REACQUIRE -> {
                update.apply(s, 2);
                courseSpeed.update(s, update, fix, reacquisition.gateThreshold());
                yield GnssOutcome.Kind.REACQUIRED;
            }
            case RESET -> {
                alignment.reset(s, eastM, northM);
                yield GnssOutcome.Kind.INITIALIZING;
            }
            case PENDING -> GnssOutcome.Kind.PENDING;
            case GATED -> GnssOutcome.Kind.GATED;
        };
    }

    /** Normalised innovation squared of the last fix's position (unitless), NaN when not computed. */
    public double lastNis() {
        return s.get(Slot.LAST_NIS);
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

    /** An immutable copy of the current estimate. */
    public FilterSnapshot snapshot() {
        double[] x = s.x;
        double[] p = s.p;
        double speed = x[SPEED_SCALE] * s.get(Slot.WHEEL_SPEED_MPS);
        double rate = s.is(Slot.STANDSTILL) || !s.is(Slot.HAS_YAW_RATE) ? 0.0 : s.get(Slot.YAW_RATE_RAD_PER_S) - x[GYRO_BIAS];
        GnssOutcome.Kind lastKind = s.lastKind();
        return new FilterSnapshot(s.get(Slot.T_REL), s.is(Slot.INITIALIZED), x[EAST], x[NORTH],
                Double.isFinite(s.get(Slot.VAR_UP_M2)) ? s.get(Slot.UP_M) : 0.0, x[YAW], x[GYRO_BIAS], s.is(Slot.INITIALIZED) ? x[SPEED_SCALE] : 1.0,
                x[GNSS_ERR_EAST], x[GNSS_ERR_NORTH], p[EAST * SIZE + EAST], p[EAST * SIZE + NORTH],
                p[NORTH * SIZE + NORTH], p[YAW * SIZE + YAW], p[GYRO_BIAS * SIZE + GYRO_BIAS],
                p[SPEED_SCALE * SIZE + SPEED_SCALE], Double.isFinite(s.get(Slot.VAR_UP_M2)) ? s.get(Slot.VAR_UP_M2) : Double.NaN,
                s.is(Slot.INITIALIZED) ? speed : s.get(Slot.WHEEL_SPEED_MPS), rate, s.is(Slot.STANDSTILL), s.get(Slot.ODOMETER_M), s.get(Slot.LAST_USED_FIX_T_REL),
                s.get(Slot.LAST_FIX_T_REL), lastKind == null ? null : outcome(lastKind, s.get(Slot.LAST_NIS)), s.get(Slot.ODOMETER_AT_LAST_USED_FIX_M),
                s.counts());
    }
}
