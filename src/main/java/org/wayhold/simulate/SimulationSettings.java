package org.wayhold.simulate;

import java.util.List;

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
 * @param route      the scenario (duration, tunnels, canyons, origin, start time, speeds)
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

    private static List<Double> boxed(double[] values) {
        Double[] b = new Double[values.length];
        for (int i = 0; i < values.length; i++) {
            b[i] = values[i];
        }
        return List.of(b);
    }
}
