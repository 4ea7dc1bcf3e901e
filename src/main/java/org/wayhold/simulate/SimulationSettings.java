package org.wayhold.simulate;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

/**
 * Everything a simulated drive depends on besides its seed.
 *
 * <p>Typical use in a test:
 * <pre>{@code
 * SimulationSettings s = SimulationSettings.defaults()
 *         .withDurationS(600).withWarmUpS(120).withTunnelsS(30, 60);
 * SimulatedDrive drive = DriveSimulator.simulate(s, 7L);
 * }</pre>
 *
 * <p>Every realistic effect the filter does not model (gyro scale error and warm-up, hills, the
 * garage, fix latency, counted teeth and queues, launch slip, canyon bias, long stops, motorway and
 * tyre growth, an unconfigured lever arm) is off in {@link #defaults()}; {@link Scenario} switches them
 * on by name, and each record's {@code on()} and {@code withX} switch them on one by one.
 *
 * @param route      the scenario (duration, tunnels, canyons, origin, start time, speeds, route elements)
 * @param wheelSpeed error model of the wheel-speed sensor
 * @param yawRate    error model of the yaw-rate gyro
 * @param gnss       error model of the GNSS receiver
 */
public record SimulationSettings(RouteSettings route, WheelSpeedSettings wheelSpeed, YawRateSettings yawRate,
                                 GnssSettings gnss) {

    public SimulationSettings {
        if (route == null || wheelSpeed == null || yawRate == null || gnss == null) {
            throw new IllegalArgumentException("route, wheelSpeed, yawRate and gnss: all must be given");
        }
    }

    /** The defaults of each part; see {@link RouteSettings#defaults()} and the sensor records. */
    public static SimulationSettings defaults() {
        return new SimulationSettings(RouteSettings.defaults(), WheelSpeedSettings.defaults(),
                YawRateSettings.defaults(), GnssSettings.defaults());
    }

    /** The same route with error-free sensors (tunnels still deny GNSS), for exact tests. */
    public SimulationSettings perfectSensors() {
        return new SimulationSettings(route, wheelSpeed.perfect(), yawRate.perfect(), gnss.perfect());
    }

    public SimulationSettings withRoute(RouteSettings value) {
        return new SimulationSettings(value, wheelSpeed, yawRate, gnss);
    }

    public SimulationSettings withWheelSpeed(WheelSpeedSettings value) {
        return new SimulationSettings(route, value, yawRate, gnss);
    }

    public SimulationSettings withYawRate(YawRateSettings value) {
        return new SimulationSettings(route, wheelSpeed, value, gnss);
    }

    public SimulationSettings withGnss(GnssSettings value) {
        return new SimulationSettings(route, wheelSpeed, yawRate, value);
    }

    /** Length of the drive (s). */
    public SimulationSettings withDurationS(double durationS) {
        return withRoute(route.withDurationS(durationS));
    }

    /** Length of the drive (minutes). */
    public SimulationSettings withMinutes(double minutes) {
        return withDurationS(minutes * 60.0);
    }

    /** GNSS-denied stretches, each this many seconds of driving, in route order. */
    public SimulationSettings withTunnelsS(double... durationsS) {
        return withRoute(route.withTunnelsS(boxed(durationsS)));
    }

    /** Stretches of degraded GNSS, each this many seconds of driving, in route order. */
    public SimulationSettings withCanyonsS(double... durationsS) {
        return withRoute(route.withCanyonsS(boxed(durationsS)));
    }

    /** Open-sky driving, with turns and the standstill, before the first tunnel or canyon (s). */
    public SimulationSettings withWarmUpS(double warmUpS) {
        return withRoute(route.withWarmUpS(warmUpS));
    }

    /** Open-sky driving between two tunnels or canyons and after the last one (s). */
    public SimulationSettings withMinGapS(double minGapS) {
        return withRoute(route.withMinGapS(minGapS));
    }

    /** Where the drive starts: WGS-84 latitude and longitude (degrees), ellipsoidal height (m). */
    public SimulationSettings withOrigin(double latDeg, double lonDeg, double altM) {
        return withRoute(route.withOrigin(latDeg, lonDeg, altM));
    }

    /** Time of the first sample (epoch seconds). */
    public SimulationSettings withStartT(double startT) {
        return withRoute(route.withStartT(startT));
    }

    /**
     * The realistic effects that are switched on, one short phrase each with its magnitude, for
     * reports (empty for the classic models).
     */
    public List<String> effects() {
        List<String> out = new ArrayList<>();
        if (yawRate.scale().enabled()) {
            out.add(String.format(Locale.ROOT, "gyro scale error %+.2f%%", 100.0 * yawRate.scale().error()));
        }
        if (yawRate.warmUp().enabled()) {
            out.add(String.format(Locale.ROOT, "gyro warm-up %+.3f deg/s, time constant %.0f s",
                    yawRate.warmUp().offsetDegPerS(), yawRate.warmUp().timeConstantS()));
        }
        if (route.hills().enabled()) {
            out.add(String.format(Locale.ROOT, "hills up to %.1f%%", route.hills().maxGradePct()));
        }
        if (route.garage().enabled()) {
            Garage g = route.garage();
            out.add(String.format(Locale.ROOT, "garage %d storeys of %.1f m, helix radius %.1f m, park %.0f s",
                    g.storeys(), g.storeyHeightM(), g.radiusM(), g.parkS()));
        }
        if (gnss.latency().enabled()) {
            out.add(String.format(Locale.ROOT, "gnss latency %.2f s", gnss.latency().latencyS()));
        }
        if (wheelSpeed.teeth().enabled()) {
            ToothCounting t = wheelSpeed.teeth();
            out.add(String.format(Locale.ROOT, "counted teeth %d on %.3f m, step %.4f m/s, blind below %.2f m/s",
                    t.teeth(), t.circumferenceM(), t.stepMps(wheelSpeed.rateHz()), t.minSpeedMps()));
        }
        if (route.queues().enabled()) {
            Queues q = route.queues();
            out.add(String.format(Locale.ROOT, "%d queues creeping at %.2f-%.2f m/s, turning %.0f-%.0f deg",
                    q.count(), q.minCreepMps(), q.maxCreepMps(), q.minTurnDeg(), q.maxTurnDeg()));
        }
        if (route.launches().enabled()) {
            out.add(String.format(Locale.ROOT, "hard launches %.1f m/s^2 for %.1f s", route.launches().accelMps2(),
                    route.launches().durationS()));
        }
        if (wheelSpeed.slip().enabled()) {
            WheelSlip w = wheelSpeed.slip();
            out.add(String.format(Locale.ROOT, "tyre slip mu %.2f, stiffness %.1f, driven load %.2f",
                    w.frictionCoefficient(), w.slipStiffness(), w.drivenLoadFraction()));
        }
        if (gnss.canyonNlos().enabled()) {
            CanyonNlos c = gnss.canyonNlos();
            out.add(String.format(Locale.ROOT, "canyon bias %.0f-%.0f m, time constant %.0f s, sigma_h %.1f m",
                    c.minBiasM(), c.maxBiasM(), c.timeConstantS(), c.reportedSigmaHM()));
        }
        if (gnss.rateHz() != GnssSettings.defaults().rateHz()) {
            out.add(String.format(Locale.ROOT, "gnss at %s Hz", gnss.rateHz()));
        }
        if (route.longStops().enabled()) {
            out.add(String.format(Locale.ROOT, "%d long stops of %.0f s", route.longStops().count(),
                    route.longStops().durationS()));
        }
        if (route.motorway().enabled()) {
            Motorway m = route.motorway();
            out.add(String.format(Locale.ROOT, "motorway %s s at %.0f-%.0f m/s", m.stretchesS(), m.minSpeedMps(),
                    m.maxSpeedMps()));
        }
        if (wheelSpeed.tyreGrowth().enabled()) {
            TyreGrowth t = wheelSpeed.tyreGrowth();
            out.add(String.format(Locale.ROOT, "tyre growth %.2f%% at %.0f m/s", 100.0 * t.growthAtReference(),
                    t.referenceSpeedMps()));
        }
        if (gnss.leverArmForwardM() != 0.0 || gnss.leverArmLeftM() != 0.0 || gnss.leverArmUpM() != 0.0) {
            out.add(String.format(Locale.ROOT, "antenna %.2f m forward, %.2f m left, %.2f m up",
                    gnss.leverArmForwardM(), gnss.leverArmLeftM(), gnss.leverArmUpM()));
        }
        return List.copyOf(out);
    }

    private static List<Double> boxed(double[] values) {
        Double[] b = new Double[values.length];
        for (int i = 0; i < values.length; i++) {
            b[i] = values[i];
        }
        return List.of(b);
    }
}
