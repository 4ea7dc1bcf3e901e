package org.wayhold.cli;

import java.io.IOException;
import java.io.PrintWriter;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.TreeMap;
import java.util.concurrent.Callable;
import org.wayhold.ingest.NdjsonWriter;
import org.wayhold.sample.Sample;
import org.wayhold.simulate.CanyonNlos;
import org.wayhold.simulate.DriveSimulator;
import org.wayhold.simulate.Garage;
import org.wayhold.simulate.GnssFault;
import org.wayhold.simulate.GnssLatency;
import org.wayhold.simulate.GnssSettings;
import org.wayhold.simulate.GyroScale;
import org.wayhold.simulate.GyroWarmUp;
import org.wayhold.simulate.HardLaunches;
import org.wayhold.simulate.Hills;
import org.wayhold.simulate.LongStops;
import org.wayhold.simulate.Motorway;
import org.wayhold.simulate.Queues;
import org.wayhold.simulate.RouteSettings;
import org.wayhold.simulate.Scenario;
import org.wayhold.simulate.SimulatedDrive;
import org.wayhold.simulate.SimulationSettings;
import org.wayhold.simulate.TimeWindow;
import org.wayhold.simulate.ToothCounting;
import org.wayhold.simulate.TyreGrowth;
import org.wayhold.simulate.WheelSlip;
import org.wayhold.simulate.WheelSpeedSettings;
import org.wayhold.simulate.YawRateSettings;
import picocli.CommandLine.Command;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Option;
import picocli.CommandLine.ParameterException;
import picocli.CommandLine.Spec;

/** {@code wayhold simulate}: writes a seeded synthetic drive as NDJSON, reference lines included. */
@Command(name = "simulate", mixinStandardHelpOptions = true,
        description = "Writes a synthetic drive (wheel speed 50 Hz, yaw rate 100 Hz, GNSS 5 Hz, reference 10 Hz) "
                + "as NDJSON; gzip-compressed when FILE ends in .gz.")
final class SimulateCommand implements Callable<Integer> {

    @Spec
    private CommandSpec spec;

    @Option(names = "--minutes", required = true, paramLabel = "M", description = "Length of the drive (minutes).")
    private double minutes;

    @Option(names = "--tunnels", split = ",", paramLabel = "S",
            description = "GNSS-denied stretches, seconds of driving each, e.g. 40,100.")
    private List<Double> tunnelsS = new ArrayList<>();

    @Option(names = "--canyons", split = ",", paramLabel = "S",
            description = "Urban-canyon stretches with degraded, often offset fixes, seconds each.")
    private List<Double> canyonsS = new ArrayList<>();

    @Option(names = "--warm-up", paramLabel = "S", defaultValue = "0",
            description = "Open-sky driving with turns and the standstill before the first tunnel or canyon "
                    + "(seconds, default ${DEFAULT-VALUE}).")
    private double warmUpS;

    @Option(names = "--seed", paramLabel = "S", defaultValue = "1",
            description = "Random seed; the same seed gives the same file (default ${DEFAULT-VALUE}).")
    private long seed;

    @Option(names = "--origin", paramLabel = "LAT,LON,ALT",
            description = "Start and ENU origin: WGS-84 latitude and longitude (degrees), ellipsoidal height (m).")
    private String origin;

    @Option(names = "--perfect", description = "Error-free sensors (tunnels still deny GNSS).")
    private boolean perfect;

    @Option(names = "--out", required = true, paramLabel = "FILE", description = "Where to write the drive.")
    private Path out;

    @Option(names = "--scenario", paramLabel = "NAME",
            description = "A what-if preset: gyro-scale, gyro-warm-up, hills, garage, latency, creep, launch-slip, "
                    + "canyon-bias, one-hertz, long-stops, motorway, lever-arm or city (several effects at once). "
                    + "The effect options apply on top of it: --X or one of X's magnitudes switches an effect on, "
                    + "--no-X switches it off.")
    private String scenario;

    @Option(names = "--gyro-scale", negatable = true, description = "Gyro scale-factor error (default 1.5%%).")
    private Boolean gyroScale;

    @Option(names = "--gyro-scale-pct", paramLabel = "P", description = "Gyro scale-factor error (percent, signed).")
    private Double gyroScalePct;

    @Option(names = "--gyro-warm-up", negatable = true,
            description = "Gyro bias settling after start (default +0.3 deg/s decaying with a 300 s time constant).")
    private Boolean gyroWarmUp;

    @Option(names = "--gyro-warm-up-deg-per-s", paramLabel = "D", description = "Extra gyro bias at start (deg/s).")
    private Double gyroWarmUpDegPerS;

    @Option(names = "--gyro-warm-up-time-s", paramLabel = "T", description = "Time constant of the settling (s).")
    private Double gyroWarmUpTimeS;

    @Option(names = "--hills", negatable = true, description = "A height profile (grades up to 6%% by default).")
    private Boolean hills;

    @Option(names = "--hills-max-grade-pct", paramLabel = "G", description = "Steepest grade (percent).")
    private Double hillsMaxGradePct;

    @Option(names = "--garage", negatable = true,
            description = "A multi-storey garage with a helical ramp, GNSS denied inside (default 5 storeys of 3 m, "
                    + "radius 12 m, parked 90 s).")
    private Boolean garage;

    @Option(names = "--garage-storeys", paramLabel = "N", description = "Storeys climbed.")
    private Integer garageStoreys;

    @Option(names = "--garage-storey-m", paramLabel = "H", description = "Height of a storey (m).")
    private Double garageStoreyM;

    @Option(names = "--garage-radius-m", paramLabel = "R", description = "Radius of the helix (m).")
    private Double garageRadiusM;

    @Option(names = "--garage-park-s", paramLabel = "S", description = "Parking standstill on the top deck (s).")
    private Double garageParkS;

    @Option(names = "--latency", negatable = true,
            description = "Fixes stamped after their time of validity (default 0.15 s).")
    private Boolean latency;

    @Option(names = "--latency-s", paramLabel = "L", description = "Fix latency (s, a multiple of 0.01).")
    private Double latencyS;

    @Option(names = "--teeth", negatable = true,
            description = "Wheel speed from counted teeth (default 48 teeth, 2.0 m tyre, blind below 0.3 m/s).")
    private Boolean teeth;

    @Option(names = "--teeth-count", paramLabel = "N", description = "Teeth on the wheel's ring.")
    private Integer teethCount;

    @Option(names = "--tyre-circumference-m", paramLabel = "C", description = "Nominal rolling circumference (m).")
    private Double tyreCircumferenceM;

    @Option(names = "--teeth-min-speed-mps", paramLabel = "V", description = "Speed below which no tooth is seen (m/s).")
    private Double teethMinSpeedMps;

    @Option(names = "--queues", negatable = true,
            description = "Traffic-light queues creeping at 0.1-0.3 m/s and turning 10-20 deg (default 3).")
    private Boolean queues;

    @Option(names = "--queue-count", paramLabel = "N", description = "Number of queues.")
    private Integer queueCount;

    @Option(names = "--creep-mps", split = ",", paramLabel = "MIN,MAX", description = "Creep speed range (m/s).")
    private List<Double> creepMps;

    @Option(names = "--creep-turn-deg", split = ",", paramLabel = "MIN,MAX", description = "Turn per queue (deg).")
    private List<Double> creepTurnDeg;

    @Option(names = "--launch-slip", negatable = true,
            description = "Hard launches (default 4.5 m/s^2 for 1 s) with driven-wheel slip (mu 0.9, stiffness 20).")
    private Boolean launchSlip;

    @Option(names = "--launch-accel-mps2", paramLabel = "A", description = "Launch acceleration (m/s^2).")
    private Double launchAccelMps2;

    @Option(names = "--launch-s", paramLabel = "S", description = "Launch length (s).")
    private Double launchS;

    @Option(names = "--tyre-friction", paramLabel = "MU", description = "Tyre-road friction coefficient.")
    private Double tyreFriction;

    @Option(names = "--slip-stiffness", paramLabel = "C", description = "Longitudinal slip stiffness per unit load.")
    private Double slipStiffness;

    @Option(names = "--canyon-bias", negatable = true,
            description = "Canyons with a slowly varying non-line-of-sight bias across the street (default 5-30 m, "
                    + "30 s, sigma_h 2.5 m, HDOP doubled, 5-8 satellites); adds two 60 s canyons when none are given.")
    private Boolean canyonBias;

    @Option(names = "--canyon-bias-m", split = ",", paramLabel = "MIN,MAX", description = "Bias range (m).")
    private List<Double> canyonBiasM;

    @Option(names = "--canyon-bias-time-s", paramLabel = "T", description = "Correlation time of the bias (s).")
    private Double canyonBiasTimeS;

    @Option(names = "--canyon-sigma-h-m", paramLabel = "S", description = "sigma_h reported inside canyons (m).")
    private Double canyonSigmaHM;

    @Option(names = "--gnss-rate-hz", paramLabel = "R", description = "GNSS fix rate (Hz, divides 100; default 5).")
    private Double gnssRateHz;

    @Option(names = "--long-stops", negatable = true, description = "Standstills of minutes (default 2 of 180 s).")
    private Boolean longStops;

    @Option(names = "--long-stop-count", paramLabel = "N", description = "Number of long stops.")
    private Integer longStopCount;

    @Option(names = "--long-stop-s", paramLabel = "S", description = "Length of each long stop (s).")
    private Double longStopS;

    @Option(names = "--motorway", negatable = true, description = "A motorway stretch (default one of 180 s at 30-36 m/s).")
    private Boolean motorway;

    @Option(names = "--motorway-s", split = ",", paramLabel = "S", description = "Motorway stretches (s each, >= 60).")
    private List<Double> motorwayS;

    @Option(names = "--motorway-mps", split = ",", paramLabel = "MIN,MAX", description = "Motorway speed band (m/s).")
    private List<Double> motorwayMps;

    @Option(names = "--tyre-growth", negatable = true,
            description = "Rolling radius growing with the square of speed (default 0.75%% at 33 m/s).")
    private Boolean tyreGrowth;

    @Option(names = "--tyre-growth-pct", paramLabel = "P", description = "Radius growth at the reference speed (percent).")
    private Double tyreGrowthPct;

    @Option(names = "--tyre-growth-ref-mps", paramLabel = "V", description = "Reference speed of the growth (m/s).")
    private Double tyreGrowthRefMps;

    @Option(names = "--lever-arm", negatable = true,
            description = "GNSS antenna away from the reference point (default 2 m behind), unknown to the filter.")
    private Boolean leverArm;

    @Option(names = "--lever-arm-m", split = ",", paramLabel = "FWD,LEFT[,UP]",
            description = "Antenna position from the reference point (m).")
    private List<Double> leverArmM;

    /** The simulator's names for the values these options set. */
    private static final Map<String, String> OPTION_NAMES = Map.ofEntries(
            Map.entry("route.durationS", "--minutes"), Map.entry("route.tunnelsS[]", "--tunnels"),
            Map.entry("route.canyonsS[]", "--canyons"), Map.entry("route.warmUpS", "--warm-up"),
            Map.entry("route.originLatDeg", "--origin"), Map.entry("route.originLonDeg", "--origin"),
            Map.entry("route.originAltM", "--origin"), Map.entry("scenario", "--scenario"),
            Map.entry("yawRate.warmUp.offsetDegPerS", "--gyro-warm-up-deg-per-s"),
            Map.entry("yawRate.warmUp.timeConstantS", "--gyro-warm-up-time-s"),
            Map.entry("route.hills.maxGradePct", "--hills-max-grade-pct"),
            Map.entry("route.garage.storeys", "--garage-storeys"),
            Map.entry("route.garage.storeyHeightM", "--garage-storey-m"),
            Map.entry("route.garage.radiusM", "--garage-radius-m"), Map.entry("route.garage.parkS", "--garage-park-s"),
            Map.entry("gnss.latency.latencyS", "--latency-s"), Map.entry("wheelSpeed.teeth.teeth", "--teeth-count"),
            Map.entry("wheelSpeed.teeth.circumferenceM", "--tyre-circumference-m"),
            Map.entry("wheelSpeed.teeth.minSpeedMps", "--teeth-min-speed-mps"),
            Map.entry("route.queues.count", "--queue-count"), Map.entry("route.queues.minCreepMps", "--creep-mps"),
            Map.entry("route.queues.maxCreepMps", "--creep-mps"), Map.entry("route.queues.minTurnDeg", "--creep-turn-deg"),
            Map.entry("route.queues.maxTurnDeg", "--creep-turn-deg"),
            Map.entry("route.launches.accelMps2", "--launch-accel-mps2"), Map.entry("route.launches.durationS", "--launch-s"),
            Map.entry("wheelSpeed.slip.frictionCoefficient", "--tyre-friction"),
            Map.entry("wheelSpeed.slip.slipStiffness", "--slip-stiffness"),
            Map.entry("gnss.canyonNlos.minBiasM", "--canyon-bias-m"), Map.entry("gnss.canyonNlos.maxBiasM", "--canyon-bias-m"),
            Map.entry("gnss.canyonNlos.timeConstantS", "--canyon-bias-time-s"),
            Map.entry("gnss.canyonNlos.reportedSigmaHM", "--canyon-sigma-h-m"), Map.entry("gnss.rateHz", "--gnss-rate-hz"),
            Map.entry("route.longStops.count", "--long-stop-count"), Map.entry("route.longStops.durationS", "--long-stop-s"),
            Map.entry("route.motorway.stretchesS[]", "--motorway-s"),
            Map.entry("route.motorway.minSpeedMps", "--motorway-mps"),
            Map.entry("route.motorway.maxSpeedMps", "--motorway-mps"),
            Map.entry("wheelSpeed.tyreGrowth.referenceSpeedMps", "--tyre-growth-ref-mps"));

    @Override
    public Integer call() throws IOException {
        SimulationSettings s = settings();
        SimulatedDrive drive;
        try {
            drive = DriveSimulator.simulate(s, seed);
        } catch (IllegalArgumentException e) {
            throw OptionErrors.named(spec, e, OPTION_NAMES);
        }
        Map<String, Integer> counts = new TreeMap<>();
        try (NdjsonWriter w = NdjsonWriter.open(out)) {
            for (Sample sample : drive.samples()) {
                w.write(sample);
                counts.merge(sample.type().wireName(), 1, Integer::sum);
            }
        }
        report(drive, counts);
        return 0;
    }

    private SimulationSettings settings() {
        // Checked here so that the message is in the option's unit (the simulator counts seconds).
        if (!(minutes > 0.0) || Double.isInfinite(minutes)) {
            throw new ParameterException(spec.commandLine(),
                    "--minutes: must be a positive number of minutes, was " + minutes);
        }
        try {
            SimulationSettings s = SimulationSettings.defaults()
                    .withMinutes(minutes)
                    .withTunnelsS(unboxed(tunnelsS))
                    .withCanyonsS(unboxed(canyonsS))
                    .withWarmUpS(warmUpS);
            if (origin != null) {
                double[] o = parseOrigin(origin);
                s = s.withOrigin(o[0], o[1], o[2]);
            }
            if (perfect) {
                s = s.perfectSensors();
            }
            if (scenario != null) {
                s = Scenario.byLabel(scenario).applyTo(s);
            }
            return effects(s);
        } catch (IllegalArgumentException e) {
            throw OptionErrors.named(spec, e, OPTION_NAMES);
        }
    }

    /**
     * Applies the single-effect options: {@code --no-X} switches an effect off; {@code --X} or any of its
     * magnitudes switches it on, with the given magnitudes replacing the defaults.
     */
    private SimulationSettings effects(SimulationSettings s) {
        YawRateSettings y = s.yawRate();
        GyroScale scale = y.scale();
        if (given(gyroScale, gyroScalePct)) {
            scale = scale.on();
            if (gyroScalePct != null) {
                // Checked here so that the message is in the option's unit (the record holds a fraction).
                if (!(gyroScalePct > -50.0 && gyroScalePct < 50.0)) {
                    throw new ParameterException(spec.commandLine(),
                            "--gyro-scale-pct: must lie in (-50, 50) percent, was " + gyroScalePct);
                }
                scale = scale.withError(gyroScalePct / 100.0);
            }
        }
        GyroWarmUp warmUp = y.warmUp();
        if (given(gyroWarmUp, gyroWarmUpDegPerS, gyroWarmUpTimeS)) {
            warmUp = warmUp.on();
            if (gyroWarmUpDegPerS != null) {
                warmUp = warmUp.withOffsetDegPerS(gyroWarmUpDegPerS);
            }
            if (gyroWarmUpTimeS != null) {
                warmUp = warmUp.withTimeConstantS(gyroWarmUpTimeS);
            }
        }
        s = s.withYawRate(y.withScale(onOff(gyroScale, scale, scale.withEnabled(false)))
                .withWarmUp(onOff(gyroWarmUp, warmUp, warmUp.withEnabled(false))));

        RouteSettings r = s.route();
        Hills h = r.hills();
        if (given(hills, hillsMaxGradePct)) {
            h = hillsMaxGradePct != null ? h.withMaxGradePct(hillsMaxGradePct) : h.on();
        }
        Garage gar = r.garage();
        if (given(garage, garageStoreys, garageStoreyM, garageRadiusM, garageParkS)) {
            gar = gar.on();
            if (garageStoreys != null) {
                gar = gar.withStoreys(garageStoreys);
            }
            if (garageStoreyM != null) {
                gar = gar.withStoreyHeightM(garageStoreyM);
            }
            if (garageRadiusM != null) {
                gar = gar.withRadiusM(garageRadiusM);
            }
            if (garageParkS != null) {
                gar = gar.withParkS(garageParkS);
            }
        }
        Queues q = r.queues();
        if (given(queues, queueCount, creepMps, creepTurnDeg)) {
            q = q.on();
            if (queueCount != null) {
                q = q.withCount(queueCount);
            }
            if (creepMps != null) {
                double[] v = pair("--creep-mps", creepMps);
                q = q.withCreepMps(v[0], v[1]);
            }
            if (creepTurnDeg != null) {
                double[] v = pair("--creep-turn-deg", creepTurnDeg);
                q = q.withTurnDeg(v[0], v[1]);
            }
        }
        HardLaunches launches = r.launches();
        WheelSlip slip = s.wheelSpeed().slip();
        if (given(launchSlip, launchAccelMps2, launchS, tyreFriction, slipStiffness)) {
            launches = launches.on();
            slip = slip.on();
            if (launchAccelMps2 != null) {
                launches = launches.withAccelMps2(launchAccelMps2);
            }
            if (launchS != null) {
                launches = launches.withDurationS(launchS);
            }
            if (tyreFriction != null) {
                slip = slip.withFrictionCoefficient(tyreFriction);
            }
            if (slipStiffness != null) {
                slip = slip.withSlipStiffness(slipStiffness);
            }
        }
        LongStops stops = r.longStops();
        if (given(longStops, longStopCount, longStopS)) {
            stops = stops.with(longStopCount != null ? longStopCount : stops.count(),
                    longStopS != null ? longStopS : stops.durationS());
        }
        Motorway m = r.motorway();
        if (given(motorway, motorwayS, motorwayMps)) {
            m = m.on();
            if (motorwayS != null) {
                m = m.withStretchesS(motorwayS);
            }
            if (motorwayMps != null) {
                double[] v = pair("--motorway-mps", motorwayMps);
                m = m.withSpeedMps(v[0], v[1]);
            }
        }
        s = s.withRoute(r.withHills(onOff(hills, h, h.withEnabled(false)))
                .withGarage(onOff(garage, gar, gar.withEnabled(false)))
                .withQueues(onOff(queues, q, q.withEnabled(false)))
                .withLaunches(onOff(launchSlip, launches, launches.withEnabled(false)))
                .withLongStops(onOff(longStops, stops, stops.withEnabled(false)))
                .withMotorway(onOff(motorway, m, m.withEnabled(false))));

        WheelSpeedSettings w = s.wheelSpeed();
        ToothCounting t = w.teeth();
        if (given(teeth, teethCount, tyreCircumferenceM, teethMinSpeedMps)) {
            t = t.on();
            if (teethCount != null) {
                t = t.withTeeth(teethCount);
            }
            if (tyreCircumferenceM != null) {
                t = t.withCircumferenceM(tyreCircumferenceM);
            }
            if (teethMinSpeedMps != null) {
                t = t.withMinSpeedMps(teethMinSpeedMps);
            }
        }
        TyreGrowth growth = w.tyreGrowth();
        if (tyreGrowthPct != null && !(tyreGrowthPct >= 0.0 && tyreGrowthPct < 20.0)) {
            throw new ParameterException(spec.commandLine(),
                    "--tyre-growth-pct: must lie in [0, 20) percent, was " + tyreGrowthPct);
        }
        if (given(tyreGrowth, tyreGrowthPct, tyreGrowthRefMps)) {
            growth = growth.withGrowth(tyreGrowthPct != null ? tyreGrowthPct / 100.0 : growth.growthAtReference(),
                    tyreGrowthRefMps != null ? tyreGrowthRefMps : growth.referenceSpeedMps());
        }
        s = s.withWheelSpeed(w.withTeeth(onOff(teeth, t, t.withEnabled(false)))
                .withSlip(onOff(launchSlip, slip, slip.withEnabled(false)))
                .withTyreGrowth(onOff(tyreGrowth, growth, growth.withEnabled(false))));

        GnssSettings g = s.gnss();
        GnssLatency lat = g.latency();
        if (given(latency, latencyS)) {
            lat = latencyS != null ? lat.withLatencyS(latencyS) : lat.on();
        }
        CanyonNlos nlos = g.canyonNlos();
        if (given(canyonBias, canyonBiasM, canyonBiasTimeS, canyonSigmaHM)) {
            nlos = nlos.on();
            if (canyonBiasM != null) {
                double[] v = pair("--canyon-bias-m", canyonBiasM);
                nlos = nlos.withBiasM(v[0], v[1]);
            }
            if (canyonBiasTimeS != null) {
                nlos = nlos.withTimeConstantS(canyonBiasTimeS);
            }
            if (canyonSigmaHM != null) {
                nlos = nlos.withReportedSigmaHM(canyonSigmaHM);
            }
            if (s.route().canyonsS().isEmpty() && !Boolean.FALSE.equals(canyonBias)) {
                s = s.withRoute(s.route().withCanyonsS(Scenario.DEFAULT_CANYONS_S));
            }
        }
        g = g.withLatency(onOff(latency, lat, lat.withEnabled(false)))
                .withCanyonNlos(onOff(canyonBias, nlos, nlos.withEnabled(false)));
        if (gnssRateHz != null) {
            g = g.withRateHz(gnssRateHz);
        }
        if (Boolean.FALSE.equals(leverArm)) {
            g = g.withLeverArm(0.0, 0.0, 0.0);
        } else if (leverArmM != null) {
            if (leverArmM.size() < 2 || leverArmM.size() > 3) {
                throw new ParameterException(spec.commandLine(),
                        "--lever-arm-m: expected FWD,LEFT or FWD,LEFT,UP (m), was " + leverArmM);
            }
            g = g.withLeverArm(leverArmM.get(0), leverArmM.get(1), leverArmM.size() == 3 ? leverArmM.get(2) : 0.0);
        } else if (Boolean.TRUE.equals(leverArm)) {
            g = g.withUnconfiguredLeverArm();
        }
        return s.withGnss(g);
    }

    /** Whether an effect's switch or one of its magnitudes was given, and it was not switched off. */
    private static boolean given(Boolean onSwitch, Object... magnitudes) {
        if (Boolean.FALSE.equals(onSwitch)) {
            return false;
        }
        if (Boolean.TRUE.equals(onSwitch)) {
            return true;
        }
        for (Object m : magnitudes) {
            if (m != null) {
                return true;
            }
        }
        return false;
    }

    /** The effect as set up, or its switched-off copy when {@code --no-X} was given. */
    private static <T> T onOff(Boolean onSwitch, T value, T off) {
        return Boolean.FALSE.equals(onSwitch) ? off : value;
    }

    private double[] pair(String option, List<Double> values) {
        if (values.size() != 2) {
            throw new ParameterException(spec.commandLine(), option + ": expected MIN,MAX, was " + values);
        }
        return new double[] {values.get(0), values.get(1)};
    }

    private double[] parseOrigin(String text) {
        String[] parts = text.split(",", -1);
        if (parts.length != 3) {
            throw new ParameterException(spec.commandLine(),
                    "--origin: expected LAT,LON,ALT (degrees, degrees, metres), was '" + text + "'");
        }
        double[] v = new double[3];
        for (int i = 0; i < 3; i++) {
            try {
                v[i] = Double.parseDouble(parts[i].trim());
            } catch (NumberFormatException e) {
                throw new ParameterException(spec.commandLine(),
                        "--origin: '" + parts[i] + "' is not a number in '" + text + "'");
            }
        }
        return v;
    }

    private void report(SimulatedDrive drive, Map<String, Integer> counts) {
        PrintWriter o = spec.commandLine().getOut();
        int total = counts.values().stream().mapToInt(Integer::intValue).sum();
        o.printf(Locale.ROOT, "wrote %s: %d samples over %.1f s from t = %.2f (seed %d)%n",
                out, total, drive.durationS(), drive.startT(), seed);
        counts.forEach((type, n) -> o.printf(Locale.ROOT, "  %-12s %7d%n", type, n));
        o.printf(Locale.ROOT, "  origin       %.6f, %.6f, %.1f m%n",
                drive.origin().latDeg(), drive.origin().lonDeg(), drive.origin().altM());
        printWindows(o, "tunnels", drive.tunnels(), drive.startT());
        printWindows(o, "canyons", drive.canyons(), drive.startT());
        printWindows(o, "motorway", drive.motorways(), drive.startT());
        printWindows(o, "garage", drive.garages(), drive.startT());
        printWindows(o, "queues", drive.queues(), drive.startT());
        printWindows(o, "long stops", drive.longStops(), drive.startT());
        for (String effect : drive.settings().effects()) {
            o.printf(Locale.ROOT, "  effect       %s%n", effect);
        }
        Map<GnssFault.Kind, Integer> faults = new TreeMap<>();
        drive.faults().forEach(f -> faults.merge(f.kind(), 1, Integer::sum));
        o.printf(Locale.ROOT, "  gnss faults  %s%n", faults.isEmpty() ? "none" : faults.toString().toLowerCase(Locale.ROOT));
        o.flush();
    }

    private static void printWindows(PrintWriter o, String label, List<TimeWindow> windows, double startT) {
        if (windows.isEmpty()) {
            return;
        }
        StringBuilder b = new StringBuilder();
        for (TimeWindow w : windows) {
            if (b.length() > 0) {
                b.append(", ");
            }
            b.append(String.format(Locale.ROOT, "%.1f-%.1f s (%.1f s)", w.startT() - startT, w.endT() - startT,
                    w.durationS()));
        }
        o.printf(Locale.ROOT, "  %-12s %s after the start%n", label, b);
    }

    private static double[] unboxed(List<Double> values) {
        double[] out = new double[values.size()];
        for (int i = 0; i < out.length; i++) {
            out[i] = values.get(i);
        }
        return out;
    }
}
