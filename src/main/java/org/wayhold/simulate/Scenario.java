package org.wayhold.simulate;

import java.util.List;
import java.util.Locale;
import java.util.StringJoiner;

/**
 * Named what-if presets: each switches on one realistic effect the filter does not model (or, for
 * {@link #CITY}, a mix of them) with its default magnitudes, on top of whatever settings it is applied
 * to. A study loops over presets and seeds:
 * <pre>{@code
 * for (Scenario sc : Scenario.values()) {
 *     for (long seed = 1; seed <= 20; seed++) {
 *         SimulatedDrive d = DriveSimulator.simulate(sc.applyTo(SimulationSettings.defaults().withMinutes(15)), seed);
 *     }
 * }
 * }</pre>
 * Presets that add stretches to the route need a long enough drive; {@link #minMinutes()} is enough for
 * every seed with the default route settings and no tunnels.
 */
public enum Scenario {
    /** The gyro reads 1.5% high on every turn. */
    GYRO_SCALE("gyro-scale", 1, "yaw-rate scale-factor error of 1.5%"),
    /** The gyro bias starts 0.3 deg/s off and settles with a 300 s time constant. */
    GYRO_WARM_UP("gyro-warm-up", 1, "gyro bias settling from +0.3 deg/s with a 300 s time constant"),
    /** Rolling country: grades up to 6%, the wheels roll along the slope, the gyro is pitched. */
    HILLS("hills", 1, "a height profile with grades up to 6%"),
    /** A visit to a five-storey garage with a helical ramp, GNSS denied inside. */
    GARAGE("garage", 8, "a five-storey garage with a 12 m helical ramp and a 90 s park, GNSS denied"),
    /** Fixes stamped 0.15 s after the instant they describe. */
    LATENCY("latency", 1, "fixes stamped 0.15 s after their time of validity"),
    /** Wheel speed from 48 counted teeth, blind below 0.3 m/s, and three queues with creeping turns. */
    CREEP("creep", 9, "wheel speed from 48 counted teeth (blind below 0.3 m/s) and three creeping queues"),
    /** Hard launches from rest with driven-wheel slip, at the start and after three queues. */
    LAUNCH_SLIP("launch-slip", 9, "4.5 m/s^2 launches with brush-model tyre slip, three queues to launch from"),
    /** Slowly varying non-line-of-sight bias across the street in canyons (two 60 s canyons unless given). */
    CANYON_BIAS("canyon-bias", 4, "5-30 m non-line-of-sight bias across the street in canyons, sigma_h 2.5 m"),
    /** GNSS at 1 Hz. */
    ONE_HERTZ("one-hertz", 1, "GNSS fixes at 1 Hz"),
    /** Two standstills of three minutes while the gyro bias settles and walks. */
    LONG_STOPS("long-stops", 9, "two 180 s standstills while the gyro bias settles and walks"),
    /** A 180 s motorway stretch at 30-36 m/s with the tyres growing with speed. */
    MOTORWAY("motorway", 5, "a 180 s motorway stretch at 30-36 m/s with tyre growth (0.75% at 33 m/s)"),
    /** The antenna 2 m behind the reference point and nobody told the filter. */
    LEVER_ARM("lever-arm", 1, "GNSS antenna 2 m behind the reference point"),
    /**
     * A city drive: canyon bias, creeping queues read by counted teeth, a gyro reading 1.5% high, fix
     * latency and an unconfigured lever arm together.
     */
    CITY("city", 12, "canyon bias, creeping queues, counted teeth, gyro scale error, latency and lever arm");

    /** Canyons a preset that needs them adds when the settings have none (s each). */
    public static final List<Double> DEFAULT_CANYONS_S = List.of(60.0, 60.0);

    private final String label;
    private final int minMinutes;
    private final String summary;

    Scenario(String label, int minMinutes, String summary) {
        this.label = label;
        this.minMinutes = minMinutes;
        this.summary = summary;
    }

    /** The name used on the command line, e.g. {@code canyon-bias}. */
    public String label() {
        return label;
    }

    /** One line on what the preset switches on. */
    public String summary() {
        return summary;
    }

    /**
     * The shortest whole number of minutes that fits the preset's route stretches with the default
     * route settings, no tunnels and no warm-up (the planner's reserve for queues and the garage is an
     * upper bound, so the stretches take less in practice).
     */
    public int minMinutes() {
        return minMinutes;
    }

    /** The settings with this preset's effects switched on; everything else is kept. */
    public SimulationSettings applyTo(SimulationSettings s) {
        RouteSettings r = s.route();
        WheelSpeedSettings w = s.wheelSpeed();
        YawRateSettings y = s.yawRate();
        GnssSettings g = s.gnss();
        return switch (this) {
            case GYRO_SCALE -> s.withYawRate(y.withScale(y.scale().on()));
            case GYRO_WARM_UP -> s.withYawRate(y.withWarmUp(y.warmUp().on()));
            case HILLS -> s.withRoute(r.withHills(r.hills().on()));
            case GARAGE -> s.withRoute(r.withGarage(r.garage().on()));
            case LATENCY -> s.withGnss(g.withLatency(g.latency().on()));
            case CREEP -> s.withWheelSpeed(w.withTeeth(w.teeth().on())).withRoute(r.withQueues(r.queues().on()));
            case LAUNCH_SLIP -> s.withWheelSpeed(w.withSlip(w.slip().on()))
                    .withRoute(r.withLaunches(r.launches().on()).withQueues(r.queues().on()));
            case CANYON_BIAS -> withCanyons(s.withGnss(g.withCanyonNlos(g.canyonNlos().on())));
            case ONE_HERTZ -> s.withGnss(g.withRateHz(1.0));
            case LONG_STOPS -> s.withRoute(r.withLongStops(r.longStops().on())).withYawRate(y.withWarmUp(y.warmUp().on()));
            case MOTORWAY -> s.withRoute(r.withMotorway(r.motorway().on()))
                    .withWheelSpeed(w.withTyreGrowth(w.tyreGrowth().on()));
            case LEVER_ARM -> s.withGnss(g.withUnconfiguredLeverArm());
            case CITY -> {
                SimulationSettings c = CANYON_BIAS.applyTo(CREEP.applyTo(s));
                c = GYRO_SCALE.applyTo(LATENCY.applyTo(LEVER_ARM.applyTo(c)));
                yield c;
            }
        };
    }

    private static SimulationSettings withCanyons(SimulationSettings s) {
        return s.route().canyonsS().isEmpty() ? s.withRoute(s.route().withCanyonsS(DEFAULT_CANYONS_S)) : s;
    }

    /**
     * The preset with this label.
     *
     * @throws IllegalArgumentException naming the known labels when there is none
     */
    public static Scenario byLabel(String label) {
        for (Scenario sc : values()) {
            if (sc.label.equals(label.toLowerCase(Locale.ROOT))) {
                return sc;
            }
        }
        throw new IllegalArgumentException("scenario: unknown preset '" + label + "'; known: " + labels());
    }

    /** The labels of all presets, comma-separated. */
    public static String labels() {
        StringJoiner j = new StringJoiner(", ");
        for (Scenario sc : values()) {
            j.add(sc.label);
        }
        return j.toString();
    }
}
