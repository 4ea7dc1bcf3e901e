package org.wayhold.simulate;

import java.util.List;
import org.wayhold.settings.Check;

/**
 * The invented scenario: where and when the drive happens and what the generated route contains.
 *
 * <p>The generated route starts at rest at the origin, drives straights, left and right turns and
 * speed changes between {@code minSpeedMps} and {@code maxSpeedMps}, stops once for
 * {@code standstillS} and reverses about {@code reverseDistanceM} at {@code reverseSpeedMps}. Tunnels
 * and urban canyons are placed along it, alternating (first tunnel, first canyon, second tunnel...),
 * each a stretch of driving of the given length. The optional elements (motorway stretches, the garage,
 * queues and long stops) join that sequence, in the order first tunnel, first canyon, first motorway
 * stretch, the garage, first queue, first long stop, second tunnel, and so on.
 *
 * @param durationS            length of the drive (s, > 0)
 * @param tunnelsS             length of each GNSS-denied stretch (s, each > 0), in route order
 * @param canyonsS             length of each stretch of degraded GNSS (s, each > 0), in route order
 * @param warmUpS              open-sky driving before the first tunnel or canyon (s, >= 0); the stretch
 *                             before the first zone always holds a left turn, a right turn and the
 *                             standstill, this makes it at least this long
 * @param minGapS              open-sky driving between two zones and after the last one (s, >= 0)
 * @param startT               time of the first sample (epoch seconds)
 * @param originLatDeg         WGS-84 latitude of the start and of the ENU origin (degrees)
 * @param originLonDeg         WGS-84 longitude of the start and of the ENU origin (degrees)
 * @param originAltM           ellipsoidal height of the road at the start (m); the road stays at this
 *                             height unless hills or a garage lift it
 * @param minSpeedMps          lowest cruising speed (m/s, > 0)
 * @param maxSpeedMps          highest cruising speed (m/s, >= minSpeedMps)
 * @param maxLateralAccelMps2  sharpest turn allowed: radius >= speed^2 / this (m/s^2, > 0)
 * @param standstillS          length of the standstill (s, > 0)
 * @param reverseSpeedMps      speed of the reversing move, as a magnitude (m/s, > 0)
 * @param reverseDistanceM     length of the reversing move (m, > 0)
 * @param referenceRateHz      rate of the {@code reference} lines (Hz, must divide 100 Hz)
 * @param hills                height profile of the road (off by default: a flat road at originAltM)
 * @param garage               a visit to a multi-storey garage with a helical ramp (off by default)
 * @param queues               traffic-light queues with creeping (off by default)
 * @param launches             hard starts from rest (off by default)
 * @param longStops            standstills of minutes (off by default)
 * @param motorway             motorway stretches (off by default)
 */
public record RouteSettings(double durationS, List<Double> tunnelsS, List<Double> canyonsS, double warmUpS,
                            double minGapS,
                            double startT, double originLatDeg, double originLonDeg, double originAltM,
                            double minSpeedMps, double maxSpeedMps, double maxLateralAccelMps2,
                            double standstillS, double reverseSpeedMps, double reverseDistanceM,
                            double referenceRateHz, Hills hills, Garage garage, Queues queues,
                            HardLaunches launches, LongStops longStops, Motorway motorway) {

    public RouteSettings {
        Check.positive("route.durationS", durationS, "s");
        tunnelsS = List.copyOf(tunnelsS);
        canyonsS = List.copyOf(canyonsS);
        for (double d : tunnelsS) {
            Check.positive("route.tunnelsS[]", d, "s");
        }
        for (double d : canyonsS) {
            Check.positive("route.canyonsS[]", d, "s");
        }
        Check.nonNegative("route.warmUpS", warmUpS, "s");
        Check.nonNegative("route.minGapS", minGapS, "s");
        Check.finite("route.startT", startT, "s");
        if (!(originLatDeg >= -89.0 && originLatDeg <= 89.0)) {
            // The local tangent plane is meaningless for a drive of kilometres at the pole itself.
            throw new IllegalArgumentException("route.originLatDeg: must lie within [-89, 89] degrees, was "
                    + originLatDeg);
        }
        if (!(originLonDeg >= -180.0 && originLonDeg <= 180.0)) {
            throw new IllegalArgumentException("route.originLonDeg: must lie within [-180, 180] degrees, was "
                    + originLonDeg);
        }
        Check.finite("route.originAltM", originAltM, "m");
        Check.positive("route.minSpeedMps", minSpeedMps, "m/s");
        Check.positive("route.maxSpeedMps", maxSpeedMps, "m/s");
        Check.range("route.maxSpeedMps", minSpeedMps, maxSpeedMps, "m/s");
        Check.positive("route.maxLateralAccelMps2", maxLateralAccelMps2, "m/s^2");
        Check.positive("route.standstillS", standstillS, "s");
        Check.positive("route.reverseSpeedMps", reverseSpeedMps, "m/s");
        Check.positive("route.reverseDistanceM", reverseDistanceM, "m");
        Route.ticksPerSample("route.referenceRateHz", referenceRateHz);
        if (hills == null || garage == null || queues == null || launches == null || longStops == null
                || motorway == null) {
            throw new IllegalArgumentException("route.hills, route.garage, route.queues, route.launches, "
                    + "route.longStops, route.motorway: must be given (use Hills.off() and so on)");
        }
    }

    /** The classic scenario: a flat road, no garage, queues, hard launches, long stops or motorway. */
    public RouteSettings(double durationS, List<Double> tunnelsS, List<Double> canyonsS, double warmUpS,
                         double minGapS, double startT, double originLatDeg, double originLonDeg, double originAltM,
                         double minSpeedMps, double maxSpeedMps, double maxLateralAccelMps2,
                         double standstillS, double reverseSpeedMps, double reverseDistanceM,
                         double referenceRateHz) {
        this(durationS, tunnelsS, canyonsS, warmUpS, minGapS, startT, originLatDeg, originLonDeg, originAltM,
                minSpeedMps, maxSpeedMps, maxLateralAccelMps2, standstillS, reverseSpeedMps, reverseDistanceM,
                referenceRateHz, Hills.off(), Garage.off(), Queues.off(), HardLaunches.off(), LongStops.off(),
                Motorway.off());
    }

    /**
     * Five minutes of open-sky driving from an invented spot in rolling farmland (51.2734 N, 10.4468 E,
     * 310 m), starting at epoch 1 800 003 600.5 s; speeds 10-20 m/s, turns up to 3 m/s^2 lateral
     * acceleration, a 15 s standstill and 5 m of reversing at 1.5 m/s; reference lines at 10 Hz.
     */
    public static RouteSettings defaults() {
        return new RouteSettings(300.0, List.of(), List.of(), 0.0, 30.0, 1_800_003_600.5,
                51.2734, 10.4468, 310.0, 10.0, 20.0, 3.0, 15.0, 1.5, 5.0, 10.0);
    }

    public RouteSettings withDurationS(double value) {
        return new RouteSettings(value, tunnelsS, canyonsS, warmUpS, minGapS, startT, originLatDeg, originLonDeg,
                originAltM, minSpeedMps, maxSpeedMps, maxLateralAccelMps2, standstillS, reverseSpeedMps,
                reverseDistanceM, referenceRateHz, hills, garage, queues,
                launches, longStops, motorway);
    }

    public RouteSettings withTunnelsS(List<Double> value) {
        return new RouteSettings(durationS, value, canyonsS, warmUpS, minGapS, startT, originLatDeg, originLonDeg,
                originAltM, minSpeedMps, maxSpeedMps, maxLateralAccelMps2, standstillS, reverseSpeedMps,
                reverseDistanceM, referenceRateHz, hills, garage, queues,
                launches, longStops, motorway);
    }

    public RouteSettings withCanyonsS(List<Double> value) {
        return new RouteSettings(durationS, tunnelsS, value, warmUpS, minGapS, startT, originLatDeg, originLonDeg,
                originAltM, minSpeedMps, maxSpeedMps, maxLateralAccelMps2, standstillS, reverseSpeedMps,
                reverseDistanceM, referenceRateHz, hills, garage, queues,
                launches, longStops, motorway);
    }

    public RouteSettings withWarmUpS(double value) {
        return new RouteSettings(durationS, tunnelsS, canyonsS, value, minGapS, startT, originLatDeg, originLonDeg,
                originAltM, minSpeedMps, maxSpeedMps, maxLateralAccelMps2, standstillS, reverseSpeedMps,
                reverseDistanceM, referenceRateHz, hills, garage, queues,
                launches, longStops, motorway);
    }

    public RouteSettings withMinGapS(double value) {
        return new RouteSettings(durationS, tunnelsS, canyonsS, warmUpS, value, startT, originLatDeg, originLonDeg,
                originAltM, minSpeedMps, maxSpeedMps, maxLateralAccelMps2, standstillS, reverseSpeedMps,
                reverseDistanceM, referenceRateHz, hills, garage, queues,
                launches, longStops, motorway);
    }

    public RouteSettings withStartT(double value) {
        return new RouteSettings(durationS, tunnelsS, canyonsS, warmUpS, minGapS, value, originLatDeg, originLonDeg,
                originAltM, minSpeedMps, maxSpeedMps, maxLateralAccelMps2, standstillS, reverseSpeedMps,
                reverseDistanceM, referenceRateHz, hills, garage, queues,
                launches, longStops, motorway);
    }

    public RouteSettings withOrigin(double latDeg, double lonDeg, double altM) {
        return new RouteSettings(durationS, tunnelsS, canyonsS, warmUpS, minGapS, startT, latDeg, lonDeg,
                altM, minSpeedMps, maxSpeedMps, maxLateralAccelMps2, standstillS, reverseSpeedMps,
                reverseDistanceM, referenceRateHz, hills, garage, queues,
                launches, longStops, motorway);
    }

    public RouteSettings withSpeedRange(double minMps, double maxMps) {
        return new RouteSettings(durationS, tunnelsS, canyonsS, warmUpS, minGapS, startT, originLatDeg, originLonDeg,
                originAltM, minMps, maxMps, maxLateralAccelMps2, standstillS, reverseSpeedMps,
                reverseDistanceM, referenceRateHz, hills, garage, queues,
                launches, longStops, motorway);
    }

    public RouteSettings withStandstillS(double value) {
        return new RouteSettings(durationS, tunnelsS, canyonsS, warmUpS, minGapS, startT, originLatDeg, originLonDeg,
                originAltM, minSpeedMps, maxSpeedMps, maxLateralAccelMps2, value, reverseSpeedMps,
                reverseDistanceM, referenceRateHz, hills, garage, queues,
                launches, longStops, motorway);
    }

    public RouteSettings withHills(Hills value) {
        return new RouteSettings(durationS, tunnelsS, canyonsS, warmUpS, minGapS, startT, originLatDeg, originLonDeg,
                originAltM, minSpeedMps, maxSpeedMps, maxLateralAccelMps2, standstillS, reverseSpeedMps,
                reverseDistanceM, referenceRateHz, value, garage, queues, launches, longStops, motorway);
    }

    public RouteSettings withGarage(Garage value) {
        return new RouteSettings(durationS, tunnelsS, canyonsS, warmUpS, minGapS, startT, originLatDeg, originLonDeg,
                originAltM, minSpeedMps, maxSpeedMps, maxLateralAccelMps2, standstillS, reverseSpeedMps,
                reverseDistanceM, referenceRateHz, hills, value, queues, launches, longStops, motorway);
    }

    public RouteSettings withQueues(Queues value) {
        return new RouteSettings(durationS, tunnelsS, canyonsS, warmUpS, minGapS, startT, originLatDeg, originLonDeg,
                originAltM, minSpeedMps, maxSpeedMps, maxLateralAccelMps2, standstillS, reverseSpeedMps,
                reverseDistanceM, referenceRateHz, hills, garage, value, launches, longStops, motorway);
    }

    public RouteSettings withLaunches(HardLaunches value) {
        return new RouteSettings(durationS, tunnelsS, canyonsS, warmUpS, minGapS, startT, originLatDeg, originLonDeg,
                originAltM, minSpeedMps, maxSpeedMps, maxLateralAccelMps2, standstillS, reverseSpeedMps,
                reverseDistanceM, referenceRateHz, hills, garage, queues, value, longStops, motorway);
    }

    public RouteSettings withLongStops(LongStops value) {
        return new RouteSettings(durationS, tunnelsS, canyonsS, warmUpS, minGapS, startT, originLatDeg, originLonDeg,
                originAltM, minSpeedMps, maxSpeedMps, maxLateralAccelMps2, standstillS, reverseSpeedMps,
                reverseDistanceM, referenceRateHz, hills, garage, queues, launches, value, motorway);
    }

    public RouteSettings withMotorway(Motorway value) {
        return new RouteSettings(durationS, tunnelsS, canyonsS, warmUpS, minGapS, startT, originLatDeg, originLonDeg,
                originAltM, minSpeedMps, maxSpeedMps, maxLateralAccelMps2, standstillS, reverseSpeedMps,
                reverseDistanceM, referenceRateHz, hills, garage, queues, launches, longStops, value);
    }
}
