package org.wayhold.calibration;

import java.util.ArrayList;
import java.util.EnumMap;
import java.util.EnumSet;
import java.util.HashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Set;
import org.apache.commons.math3.exception.TooManyEvaluationsException;
import org.apache.commons.math3.optim.InitialGuess;
import org.apache.commons.math3.optim.MaxEval;
import org.apache.commons.math3.optim.SimpleBounds;
import org.apache.commons.math3.optim.nonlinear.scalar.GoalType;
import org.apache.commons.math3.optim.nonlinear.scalar.ObjectiveFunction;
import org.apache.commons.math3.optim.nonlinear.scalar.noderiv.BOBYQAOptimizer;
import org.wayhold.filter.FilterSnapshot;
import org.wayhold.filter.NavigationFilter;
import org.wayhold.filter.StateIndex;
import org.wayhold.sample.FixType;
import org.wayhold.sample.GnssFix;
import org.wayhold.settings.FilterSettings;
import org.wayhold.settings.Settings;
import org.wayhold.settings.VehicleProfile;

/**
 * Fits one vehicle's sensor profile to its drives by maximum likelihood of the filter's innovations
 * ({@link InnovationLikelihood}).
 *
 * <p>Steps:
 * <ol>
 *   <li>What the drives support ({@link DriveSupport}): none at all is refused
 *       ({@link CalibrationRefused}); constants that need turns or speed changes the drives lack are
 *       left at their configured values. Fixes lose their GNSS speed and course (the filter's course
 *       model has no latency term; see {@link CalibrationDrive#positionsOnly()}).</li>
 *   <li>Wheel-speed and gyro reading noise from the readings ({@link ReadingNoise}): the innovations
 *       hardly see it. How flat the likelihood is in them is measured and reported.</li>
 *   <li>The constants (latency, lever arm, odometer and gyro scale) are filter states. One replay with
 *       the configured priors gives their converged estimates; the likelihood evaluations then hold those
 *       the drives support there (zero prior variance), so that the noise is fitted to the vehicle's
 *       geometry rather than to a filter still learning it. The others stay states with their
 *       configured priors, as they will be in the profile.</li>
 *   <li>BOBYQA (Powell, "The BOBYQA algorithm for bound constrained optimization without derivatives",
 *       Cambridge report DAMTP 2009/NA06; the Apache Commons Math implementation) maximises ln L over
 *       the noise parameters on log scale. It is derivative-free and builds quadratic models from
 *       function values spread over its trust region, so the steps the filter's decisions put into ln L
 *       do not mislead it as they would a gradient method. Random walks the likelihood is flat in at the
 *       start are not searched.</li>
 *   <li>Support of each noise estimate: it is moved by its {@link Parameter#resolution()} either way;
 *       unless ln L falls by at least {@link #SUPPORT_DROP} on both sides (the likelihood-ratio 95 %
 *       interval lies inside that resolution: Wilks, Ann. Math. Statist. 9, 1938; chi-square(1) 0.95
 *       quantile 3.841, halved), the data cannot tell the value and the configured one is kept. A
 *       better neighbour restarts the optimiser once.</li>
 *   <li>The constants' estimates: the filter's converged states in a replay under the fitted noise,
 *       with the configured priors, and the filter's 1-sigma. A constant state's filtered estimate at
 *       the end of a drive has seen the whole drive, so it equals its smoothed estimate; with a prior
 *       far wider than the result it approaches the maximum-likelihood value. Refining them by the
 *       likelihood was tried and measured useless: the profile likelihood in them is flat within their
 *       resolutions, because the correlated GNSS error state and the filter's own online learning of
 *       the scales absorb small constant offsets, and the optimiser did not move them. A constant is
 *       kept when its 1-sigma is below resolution / 1.96 (the same 95 % criterion) or when its 95 %
 *       interval excludes the configured value.</li>
 * </ol>
 */
public final class Calibration {

    /** Fall of ln L that the data must show over a parameter's resolution (nats): 3.841 / 2. */
    public static final double SUPPORT_DROP = 3.841 / 2.0;
    /** BOBYQA's initial trust-region radius, in optimiser coordinates (see {@link Parameter}). */
    private static final double INITIAL_RADIUS = 0.5;
    /** BOBYQA's final trust-region radius, in optimiser coordinates. */
    private static final double FINAL_RADIUS = 0.02;
    /** Noise parameters searched only when the likelihood is not flat in them at the start. */
    private static final Set<Parameter> SCREENED = EnumSet.of(Parameter.GYRO_BIAS_WALK,
            Parameter.SPEED_SCALE_WALK, Parameter.GYRO_SCALE_WALK);
    /**
     * Prior 1-sigma the written profile keeps at least, whatever the fit's precision (common practice):
     * an antenna remounted moves by centimetres (m); a receiver's stamping jitters by milliseconds (s);
     * tyre pressure, load and temperature move the odometer scale by tenths of a percent; a gyro's scale
     * factor drifts with temperature by about a tenth of a percent.
     */
    static final double LEVER_SIGMA_FLOOR_M = 0.05;
    static final double LATENCY_SIGMA_FLOOR_S = 0.01;
    static final double SPEED_SCALE_SIGMA_FLOOR = 0.005;
    static final double GYRO_SCALE_SIGMA_FLOOR = 0.002;
    /** The written prior sigma is this many times the fit's standard error, when that is larger than the floor. */
    static final double SIGMA_PER_STANDARD_ERROR = 2.0;
    /** A log-likelihood that is not a number (a replay that never initialised) counts this far below the worst seen (nats). */
    private static final double FAILED_PENALTY = 1000.0;

    private Calibration() {
    }

    /**
     * How to fit.
     *
     * @param vehicle        the vehicle profile to fit (its name in the configuration)
     * @param maxEvaluations most likelihood evaluations the optimiser may spend (count, at least 20)
     */
    public record Options(String vehicle, int maxEvaluations) {
        public Options {
            if (vehicle == null || vehicle.isBlank()) {
                throw new IllegalArgumentException("vehicle: a profile name is needed");
            }
            if (maxEvaluations < 20) {
                throw new IllegalArgumentException("max_evaluations: must be at least 20, was " + maxEvaluations);
            }
        }
    }

    /** Hears how the fit goes; called on the fitting thread. */
    public interface Listener {
        Listener NONE = new Listener() {
        };

        /** A step began. */
        default void stage(String what) {
        }

        /** A likelihood evaluation of the optimiser finished. */
        default void evaluation(int count, double logLikelihood, double best) {
        }
    }

    /**
     * Fits.
     *
     * @param drives the drives, each in processing order
     * @param base   the configuration to start from; the result changes its filter noise and the vehicle's
     *               profile only
     * @throws CalibrationRefused when the drives support no fit, naming what is missing
     */
    public static CalibrationResult fit(List<CalibrationDrive> drives, Settings base, Options options,
                                        Listener listener) {
        listener.stage("checking what the drives support");
        DriveSupport support = DriveSupport.of(drives);
        String refusal = support.refusal();
        if (refusal != null) {
            throw new CalibrationRefused(refusal);
        }
        List<String> notes = new ArrayList<>();
        if (drives.stream().anyMatch(CalibrationDrive::hasVelocity)) {
            notes.add("GNSS speed and course were left out of the fit (positions only): the filter's course model "
                    + "has no latency term, so courses would pin the forward lever arm at -speed x latency");
            drives = drives.stream().map(CalibrationDrive::positionsOnly).toList();
        }
        listener.stage("reading noise from the readings");
        double wheelNoise = ReadingNoise.wheelSpeedMps(drives);
        double gyroNoise = ReadingNoise.yawRateRadPerS(drives);
        FilterSettings bf = base.filter();
        if (Double.isNaN(wheelNoise)) {
            notes.add("wheel-speed noise left at the configured value: fewer than " + ReadingNoise.MIN_TRIPLES
                    + " evenly spaced readings while moving");
            wheelNoise = bf.wheelSpeedNoiseMps();
        }
        if (Double.isNaN(gyroNoise)) {
            notes.add("gyro noise left at the configured value: fewer than " + ReadingNoise.MIN_TRIPLES
                    + " evenly spaced readings");
            gyroNoise = bf.gyroNoiseRadPerS();
        }
        Model model = new Model(base, options.vehicle(), drives, wheelNoise, gyroNoise);
        InnovationLikelihood likelihood = new InnovationLikelihood(drives, options.vehicle());
        Map<Parameter, String> unsupported = new EnumMap<>(support.unsupported());

        // The constants as states, with the configured priors: their converged estimates start the fit.
        listener.stage("replaying with the constants as filter states");
        double[] configured = model.configuredValues();
        Settings asStates = model.settings(configured, Set.of(), null);
        likelihood.choose(asStates);
        InnovationLikelihood.Replay first = likelihood.replay(asStates, true);
        double[] start = configured.clone();
        for (Parameter p : Parameter.values()) {
            if (p.constant() && !unsupported.containsKey(p)) {
                start[p.ordinal()] = pooled(first, p)[0];
            }
        }

        // Constants the drives support are held at their estimates while the noise is fitted; the others
        // stay filter states with their configured priors, as they will be in the profile.
        Set<Parameter> held = EnumSet.noneOf(Parameter.class);
        for (Parameter p : Parameter.values()) {
            if (p.constant() && !unsupported.containsKey(p)) {
                held.add(p);
            }
        }
        listener.stage("choosing the fixes that count");
        int counted = likelihood.choose(model.settings(start, held, null));
        if (counted < DriveSupport.MIN_FIXES) {
            throw new CalibrationRefused(String.format(Locale.ROOT, "too few fixes the filter accepts: %d after "
                    + "the warm-up, at least %d needed", counted, DriveSupport.MIN_FIXES));
        }
        Search screen = new Search(likelihood, model, start, List.of(), held, listener);
        double startLogL = screen.logLikelihood(start);
        // Random walks the likelihood is flat in at the start are not searched: a flat coordinate costs
        // the optimiser evaluations and ends wherever it wanders.
        listener.stage("screening the random walks");
        List<Parameter> free = new ArrayList<>();
        Map<Parameter, Estimate> estimates = new EnumMap<>(Parameter.class);
        for (Parameter p : Parameter.values()) {
            if (!p.logScale()) {
                continue;
            }
            if (!SCREENED.contains(p)) {
                free.add(p);
                continue;
            }
            int i = p.ordinal();
            double[] up = start.clone();
            up[i] = p.moved(start[i], 1);
            double[] down = start.clone();
            down[i] = p.moved(start[i], -1);
            double change = Math.max(Math.abs(screen.logLikelihood(up) - startLogL),
                    Math.abs(screen.logLikelihood(down) - startLogL));
            if (change >= SUPPORT_DROP) {
                free.add(p);
            } else {
                estimates.put(p, new Estimate(p, configured[i], start[i], Double.NaN, Double.NaN, Double.NaN, false,
                        String.format(Locale.ROOT, "left at the configured value: ln L changes by at most %.2f nats "
                                + "when it moves by %s, at least %.2f needed", change, resolutionText(p), SUPPORT_DROP)));
            }
        }
        listener.stage("maximising the likelihood over " + free.size() + " noise parameters");
        Search search = new Search(likelihood, model, start, free, held, listener);
        search.value(search.coordinates(start));
        double[] best = search.maximise(options.maxEvaluations());
        listener.stage("checking what the likelihood supports");
        // A neighbour better than the optimiser's end means it stopped early (the steps the filter's
        // decisions put into ln L can shrink its trust region too soon): restart once from there.
        Map<Parameter, double[]> checks = support(search, free, best);
        double[] better = betterNeighbour(checks, free, best, search.bestLogL);
        if (better != null) {
            listener.stage("restarting the optimiser from a better neighbour");
            search.restartFrom(better);
            best = search.maximise(options.maxEvaluations());
            checks = support(search, free, best);
        }
        double bestLogL = search.bestLogL;
        double[] kept = configured.clone();
        for (Parameter p : free) {
            int i = p.ordinal();
            double[] c = checks.get(p);
            double drop = Math.min(bestLogL - c[1], bestLogL - c[3]);
            double se = standardError(p, best[i], c[0], c[2], bestLogL, c[1], c[3]);
            boolean ok = drop >= SUPPORT_DROP;
            String note = ok ? "" : String.format(Locale.ROOT, "left at the configured value: ln L changes by only "
                    + "%.2f nats when the estimate moves by %s, at least %.2f needed", drop, resolutionText(p),
                    SUPPORT_DROP);
            estimates.put(p, new Estimate(p, configured[i], start[i], best[i], se, drop, ok, note));
            if (ok) {
                kept[i] = best[i];
            }
        }
        double[] fitted = best;

        listener.stage("measuring how flat the likelihood is in the reading noise");
        double wheelFlatness = bestLogL - model.withReadingNoise(1.5, 1.0, () -> search.logLikelihood(fitted));
        double gyroFlatness = bestLogL - model.withReadingNoise(1.0, 1.5, () -> search.logLikelihood(fitted));

        // The constants again as states, now under the fitted noise: its converged estimates are theirs.
        listener.stage("replaying with the constants as filter states under the fitted noise");
        double[] statesAgain = kept.clone();
        for (Parameter p : Parameter.values()) {
            if (p.constant()) {
                statesAgain[p.ordinal()] = configured[p.ordinal()];
            }
        }
        InnovationLikelihood.Replay second = likelihood.replay(model.settings(statesAgain, Set.of(), null), true);
        for (Parameter p : Parameter.values()) {
            if (!p.constant()) {
                continue;
            }
            int i = p.ordinal();
            if (unsupported.containsKey(p)) {
                estimates.put(p, new Estimate(p, configured[i], start[i], Double.NaN, Double.NaN, Double.NaN, false,
                        "left at the configured value: " + unsupported.get(p)));
                continue;
            }
            double[] est = pooled(second, p);
            // Kept when the 95 % interval, +-1.96 sigma, lies inside the resolution (the likelihood's
            // criterion), or when it excludes the configured value: then the estimate, with its sigma, is
            // better than a value the data rejects.
            double limit = p.resolution() / 1.96;
            boolean resolved = est[1] <= limit;
            boolean rejectsConfigured = Math.abs(est[0] - configured[i]) > 1.96 * est[1];
            boolean ok = resolved || rejectsConfigured;
            String note = ok ? "" : String.format(Locale.ROOT, "left at the configured value: the filter's 1-sigma "
                    + "after the drives is %.3g %s (at most %.3g needed), and the configured value lies within "
                    + "1.96 sigma of the estimate", est[1], p.unitName(), limit);
            double drop = 0.5 * (p.resolution() / est[1]) * (p.resolution() / est[1]);
            estimates.put(p, new Estimate(p, configured[i], start[i], est[0], est[1], drop, ok, note));
            if (ok) {
                kept[i] = est[0];
            }
        }

        listener.stage("replaying with the calibrated profile");
        Settings calibrated = model.settings(kept, Set.of(), estimates);
        InnovationLikelihood.Replay last = likelihood.replay(calibrated, true);
        return new CalibrationResult(calibrated, estimates, wheelNoise, bf.wheelSpeedNoiseMps(), wheelFlatness,
                gyroNoise, bf.gyroNoiseRadPerS(), gyroFlatness, last.meanGyroBiasRadPerS(), startLogL, bestLogL,
                counted, search.evaluations, first.meanNis(), last.meanNis(), support, List.copyOf(notes));
    }

    /**
     * A constant's estimate over all drives from the filter's final state and variance on each: the
     * inverse-variance weighted mean and its 1-sigma, {value, sigma}. A constant state's filtered
     * estimate at a drive's end has seen all of that drive, so it is also its smoothed estimate.
     */
    private static double[] pooled(InnovationLikelihood.Replay r, Parameter p) {
        int state = switch (p) {
            case GNSS_LATENCY_S -> StateIndex.GNSS_LATENCY;
            case LEVER_FORWARD_M -> StateIndex.LEVER_FORWARD;
            case LEVER_LEFT_M -> StateIndex.LEVER_LEFT;
            case SPEED_SCALE -> StateIndex.SPEED_SCALE;
            case GYRO_SCALE -> StateIndex.GYRO_SCALE;
            default -> throw new IllegalArgumentException("not a constant: " + p);
        };
        double weights = 0.0;
        double sum = 0.0;
        for (int d = 0; d < r.finals().size(); d++) {
            FilterSnapshot s = r.finals().get(d);
            if (!s.initialized()) {
                continue;
            }
            double var = Math.max(r.finalCovariances().get(d)[state * StateIndex.SIZE + state], 1e-300);
            double value = switch (p) {
                case GNSS_LATENCY_S -> s.gnssLatencyS();
                case LEVER_FORWARD_M -> s.leverForwardM();
                case LEVER_LEFT_M -> s.leverLeftM();
                case SPEED_SCALE -> s.speedScale();
                default -> s.gyroScale();
            };
            weights += 1.0 / var;
            sum += value / var;
        }
        if (weights == 0.0) {
            return new double[] {Double.NaN, Double.POSITIVE_INFINITY};
        }
        double v = Math.min(Math.max(sum / weights, p.lower()), p.upper());
        return new double[] {v, Math.sqrt(1.0 / weights)};
    }

    /** Per free parameter: {value up, ln L up, value down, ln L down} around the best values. */
    private static Map<Parameter, double[]> support(Search search, List<Parameter> free, double[] best) {
        Map<Parameter, double[]> out = new EnumMap<>(Parameter.class);
        for (Parameter p : free) {
            int i = p.ordinal();
            double[] up = best.clone();
            up[i] = p.moved(best[i], 1);
            double[] down = best.clone();
            down[i] = p.moved(best[i], -1);
            out.put(p, new double[] {up[i], search.logLikelihood(up), down[i], search.logLikelihood(down)});
        }
        return out;
    }

    /** The best neighbour when it beats the best by more than a tenth of a nat, else null. */
    private static double[] betterNeighbour(Map<Parameter, double[]> checks, List<Parameter> free, double[] best,
                                            double bestLogL) {
        double top = bestLogL + 0.1;
        double[] out = null;
        for (Parameter p : free) {
            double[] c = checks.get(p);
            for (int side = 0; side < 2; side++) {
                if (c[2 * side + 1] > top) {
                    top = c[2 * side + 1];
                    out = best.clone();
                    out[p.ordinal()] = c[2 * side];
                }
            }
        }
        return out;
    }

    private static String resolutionText(Parameter p) {
        if (p.logScale()) {
            return "a factor of " + p.resolution();
        }
        return p.resolution() + (p.unitName().isEmpty() ? "" : " " + p.unitName());
    }

    /**
     * 1-sigma from the second difference of ln L over the two moved values (same unit as the value):
     * sigma^2 = -1 / (d^2 ln L / d theta^2), on the log for noise parameters and carried to the value.
     */
    private static double standardError(Parameter p, double at, double up, double down, double l0, double lUp,
                                        double lDown) {
        double a = p.logScale() ? Math.log(at) : at;
        double u = p.logScale() ? Math.log(up) : up;
        double d = p.logScale() ? Math.log(down) : down;
        double hu = u - a;
        double hd = a - d;
        if (!(hu > 0.0) || !(hd > 0.0)) {
            return Double.NaN;
        }
        // Second derivative of the parabola through the three points.
        double curvature = 2.0 * ((lUp - l0) / hu - (l0 - lDown) / hd) / (hu + hd);
        if (!(curvature < 0.0)) {
            return Double.NaN;
        }
        double se = Math.sqrt(-1.0 / curvature);
        return p.logScale() ? at * se : se;
    }

    /** The optimiser's view: coordinates of the free parameters, evaluations counted, the best kept. */
    private static final class Search {
        final InnovationLikelihood likelihood;
        final Model model;
        final double[] start;
        final List<Parameter> free;
        final Set<Parameter> held;
        final Listener listener;
        int evaluations;
        double worst = Double.POSITIVE_INFINITY;
        double bestLogL = Double.NEGATIVE_INFINITY;
        double[] best;

        Search(InnovationLikelihood likelihood, Model model, double[] start, List<Parameter> free, Set<Parameter> held,
               Listener listener) {
            this.likelihood = likelihood;
            this.held = held;
            this.model = model;
            this.start = start.clone();
            this.free = free;
            this.listener = listener;
            this.best = start.clone();
        }

        double[] coordinates(double[] values) {
            double[] c = new double[free.size()];
            for (int k = 0; k < c.length; k++) {
                c[k] = free.get(k).toCoordinate(values[free.get(k).ordinal()]);
            }
            return c;
        }

        double[] values(double[] coordinates) {
            double[] v = start.clone();
            for (int k = 0; k < coordinates.length; k++) {
                Parameter p = free.get(k);
                v[p.ordinal()] = p.fromCoordinate(coordinates[k]);
            }
            return v;
        }

        /** ln L at all values, the held constants fixed. */
        double logLikelihood(double[] values) {
            double l = likelihood.logLikelihood(model.settings(values, held, null));
            return Double.isNaN(l) ? worst - FAILED_PENALTY : l;
        }

        /** ln L at optimiser coordinates; remembers the best. */
        double value(double[] coordinates) {
            double[] v = values(coordinates);
            double l = logLikelihood(v);
            evaluations++;
            worst = Math.min(worst, l);
            if (l > bestLogL) {
                bestLogL = l;
                best = v;
            }
            listener.evaluation(evaluations, l, bestLogL);
            return l;
        }

        /** The next {@link #maximise} starts here (the best so far is kept). */
        void restartFrom(double[] values) {
            System.arraycopy(values, 0, start, 0, start.length);
        }

        double[] maximise(int maxEvaluations) {
            int n = free.size();
            if (n == 0) {
                return best.clone();
            }
            if (n == 1) {
                // BOBYQA needs two coordinates at least: scan the one on its resolution instead.
                Parameter p = free.get(0);
                for (int step = -4; step <= 4; step++) {
                    double[] v = start.clone();
                    double x = start[p.ordinal()];
                    for (int k = 0; k < Math.abs(step); k++) {
                        x = p.moved(x, Integer.signum(step));
                    }
                    v[p.ordinal()] = x;
                    value(coordinates(v));
                }
                return best.clone();
            }
            double[] lower = new double[n];
            double[] upper = new double[n];
            for (int k = 0; k < n; k++) {
                lower[k] = free.get(k).lowerCoordinate();
                upper[k] = free.get(k).upperCoordinate();
            }
            BOBYQAOptimizer optimizer = new BOBYQAOptimizer(2 * n + 1, INITIAL_RADIUS, FINAL_RADIUS);
            try {
                optimizer.optimize(new MaxEval(maxEvaluations), new ObjectiveFunction(this::value),
                        GoalType.MAXIMIZE, new InitialGuess(coordinates(start)), new SimpleBounds(lower, upper));
            } catch (TooManyEvaluationsException e) {
                // The best point seen stands; the report says how many evaluations were spent.
            }
            return best.clone();
        }
    }

    /** Parameter values to settings and back. */
    static final class Model {
        private final Settings base;
        private final String vehicle;
        private double wheelNoiseMps;
        private double gyroNoiseRadPerS;
        /** The filter's 1-sigma of a typical fix under the base configuration (m): median over the fixes. */
        private final double referenceSigmaM;

        Model(Settings base, String vehicle, List<CalibrationDrive> drives, double wheelNoiseMps,
              double gyroNoiseRadPerS) {
            this.base = base;
            this.vehicle = vehicle;
            this.wheelNoiseMps = wheelNoiseMps;
            this.gyroNoiseRadPerS = gyroNoiseRadPerS;
            this.referenceSigmaM = typicalSigmaM(base, vehicle, drives);
        }

        /** The 1-sigma the filter assumes for a typical fix of these drives under these settings (m). */
        static double typicalSigmaM(Settings settings, String vehicle, List<CalibrationDrive> drives) {
            NavigationFilter f = new NavigationFilter(settings.filter(), settings.gating(), settings.outage(),
                    settings.profileFor(vehicle));
            double[] sigmas = drives.stream().flatMap(d -> d.samples().stream())
                    .filter(s -> s instanceof GnssFix g && g.fix() != FixType.NONE)
                    .mapToDouble(s -> f.horizontalSigmaM((GnssFix) s)).sorted().toArray();
            if (sigmas.length == 0) {
                return Double.NaN;
            }
            int n = sigmas.length;
            return n % 2 == 1 ? sigmas[n / 2] : 0.5 * (sigmas[n / 2 - 1] + sigmas[n / 2]);
        }

        double withReadingNoise(double wheelFactor, double gyroFactor, java.util.function.DoubleSupplier run) {
            double w = wheelNoiseMps;
            double g = gyroNoiseRadPerS;
            wheelNoiseMps = w * wheelFactor;
            gyroNoiseRadPerS = g * gyroFactor;
            try {
                return run.getAsDouble();
            } finally {
                wheelNoiseMps = w;
                gyroNoiseRadPerS = g;
            }
        }

        /** The base configuration's values, indexed by {@link Parameter#ordinal()}. */
        double[] configuredValues() {
            FilterSettings f = base.filter();
            VehicleProfile p = base.profileFor(vehicle);
            double[] v = new double[Parameter.values().length];
            v[Parameter.GNSS_WHITE_M.ordinal()] = Math.sqrt(1.0 - f.gnssCorrelatedShare()) * referenceSigmaM;
            v[Parameter.GNSS_CORRELATED_M.ordinal()] = Math.sqrt(f.gnssCorrelatedShare()) * referenceSigmaM;
            v[Parameter.GNSS_CORRELATION_TIME_S.ordinal()] = f.gnssCorrelationTimeS();
            v[Parameter.GYRO_BIAS_WALK.ordinal()] = f.gyroBiasRandomWalkRadPerSPerSqrtS();
            v[Parameter.SPEED_SCALE_WALK.ordinal()] = f.speedScaleRandomWalkPerSqrtS();
            v[Parameter.GYRO_SCALE_WALK.ordinal()] = f.gyroScaleRandomWalkPerSqrtS();
            v[Parameter.GNSS_LATENCY_S.ordinal()] = p.gnssLatencyS();
            v[Parameter.LEVER_FORWARD_M.ordinal()] = p.leverArmForwardM();
            v[Parameter.LEVER_LEFT_M.ordinal()] = p.leverArmLeftM();
            v[Parameter.SPEED_SCALE.ordinal()] = p.speedScale();
            v[Parameter.GYRO_SCALE.ordinal()] = p.gyroScale();
            return v;
        }

        /**
         * The configuration of parameter values.
         *
         * @param values         indexed by {@link Parameter#ordinal()}
         * @param fixed          constants held at their values (zero prior variance) for likelihood
         *                       evaluations; the others start from their values with the configured priors
         * @param fitted         for the written profile: the estimates, whose precision sets the priors the
         *                       filter starts the constants with; null keeps the configured priors
         */
        Settings settings(double[] values, Set<Parameter> fixed, Map<Parameter, Estimate> fitted) {
            FilterSettings f = base.filter();
            VehicleProfile p = base.profileFor(vehicle);
            double white = values[Parameter.GNSS_WHITE_M.ordinal()];
            double correlated = values[Parameter.GNSS_CORRELATED_M.ordinal()];
            double total2 = white * white + correlated * correlated;
            double k = Math.sqrt(total2) / referenceSigmaM;
            Map<FixType, Double> scales = new HashMap<>();
            for (FixType t : FixType.values()) {
                scales.put(t, f.fixScale(t) * k);
            }
            double share = correlated * correlated / total2;
            double speedScaleSigma = f.initialSpeedScaleSigma();
            double gyroScaleSigma = f.initialGyroScaleSigma();
            double leverSigma = p.leverArmSigmaM();
            double latencySigma = p.gnssLatencySigmaS();
            if (!fixed.isEmpty()) {
                speedScaleSigma = fixed.contains(Parameter.SPEED_SCALE) ? 0.0 : speedScaleSigma;
                gyroScaleSigma = fixed.contains(Parameter.GYRO_SCALE) ? 0.0 : gyroScaleSigma;
                // One sigma serves both lever-arm axes: held when either is.
                leverSigma = fixed.contains(Parameter.LEVER_FORWARD_M) || fixed.contains(Parameter.LEVER_LEFT_M)
                        ? 0.0 : leverSigma;
                latencySigma = fixed.contains(Parameter.GNSS_LATENCY_S) ? 0.0 : latencySigma;
            } else if (fitted != null) {
                speedScaleSigma = prior(fitted.get(Parameter.SPEED_SCALE), SPEED_SCALE_SIGMA_FLOOR, speedScaleSigma);
                gyroScaleSigma = prior(fitted.get(Parameter.GYRO_SCALE), GYRO_SCALE_SIGMA_FLOOR, gyroScaleSigma);
                latencySigma = prior(fitted.get(Parameter.GNSS_LATENCY_S), LATENCY_SIGMA_FLOOR_S, latencySigma);
                double fwd = prior(fitted.get(Parameter.LEVER_FORWARD_M), LEVER_SIGMA_FLOOR_M, leverSigma);
                double left = prior(fitted.get(Parameter.LEVER_LEFT_M), LEVER_SIGMA_FLOOR_M, leverSigma);
                leverSigma = Math.max(fwd, left);
            }
            FilterSettings nf = new FilterSettings(
                    wheelNoiseMps, f.wheelSpeedRateHz(), gyroNoiseRadPerS, f.gyroRateHz(),
                    values[Parameter.GYRO_BIAS_WALK.ordinal()], values[Parameter.SPEED_SCALE_WALK.ordinal()],
                    f.initialYawSigmaRad(), f.initialGyroBiasSigmaRadPerS(), speedScaleSigma,
                    f.gnssFloorM(), f.gnssRangeErrorM(), f.gnssDefaultSigmaM(), scales,
                    share, values[Parameter.GNSS_CORRELATION_TIME_S.ordinal()],
                    f.gnssVelocityMinSpeedMps(), f.gnssSpeedSigmaMps(), f.gnssCourseSigmaDeg(),
                    f.standstillAfterS(), f.headingInitMinDistanceM(), gyroScaleSigma,
                    values[Parameter.GYRO_SCALE_WALK.ordinal()], f.gyroRateProportionalNoise(),
                    f.sideslipRadPerMps2(), f.wheelSpeedZeroBelowMps(), f.minTurnRadiusM(), f.gnssHdopFloorM(),
                    f.rollingRadiusGrowthAt30Mps());
            VehicleProfile np = new VehicleProfile(values[Parameter.LEVER_FORWARD_M.ordinal()],
                    values[Parameter.LEVER_LEFT_M.ordinal()], p.leverArmUpM(), leverSigma,
                    values[Parameter.GNSS_LATENCY_S.ordinal()], latencySigma,
                    values[Parameter.SPEED_SCALE.ordinal()], values[Parameter.GYRO_SCALE.ordinal()]);
            Map<String, VehicleProfile> vehicles = new HashMap<>(base.vehicles());
            vehicles.put(vehicle, np);
            return new Settings(base.server(), nf, base.gating(), base.outage(), base.ordering(), base.history(),
                    vehicles, base.journal(), base.ingest());
        }

        /** The prior sigma of a fitted constant: the configured one unless kept, else scaled error or floor. */
        private static double prior(Estimate e, double floor, double configured) {
            if (e == null || !e.kept()) {
                return configured;
            }
            double se = Double.isNaN(e.standardError()) ? 0.0 : SIGMA_PER_STANDARD_ERROR * e.standardError();
            return Math.max(se, floor);
        }
    }
}
