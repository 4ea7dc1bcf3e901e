/**
 * Seeded synthetic drives: a kinematic truth trajectory on an invented route, and sensor models that
 * sample it (wheel speed, yaw rate, GNSS, reference points).
 *
 * <p>Units and frames:
 * <ul>
 *   <li>The truth lives in a local ENU frame (metres; x east, y north, z up) around a configurable
 *       WGS-84 origin. The road is level unless hills or a garage give it a grade; speed is along the
 *       road, so the horizontal speed is speed * cos(grade) and the height the integral of
 *       speed * sin(grade). Yaw is radians counter-clockwise from east; yaw rate is rad/s about the
 *       vertical, positive counter-clockwise seen from above. Headings and courses written into
 *       samples are degrees clockwise from true north; {@code reference} lines carry the truth at the
 *       vehicle reference point, its height included in {@code alt}.</li>
 *   <li>Absolute times ({@code t}, {@code startT}, {@code endT}) are epoch seconds on the vehicle's
 *       clock, about 1.8e9 by default so that precision bugs downstream show. Internally the drive is
 *       built on an integer grid of 10 ms ticks counted from the start, so every sample instant is
 *       exact; a timestamp is {@code startT + tick / 100.0}.</li>
 *   <li>Settings name their units: {@code Mps}, {@code Mps2}, {@code Deg}, {@code DegPerS}, {@code M},
 *       {@code S}, {@code Hz}, {@code Pct}; scale errors are unitless fractions (0.01 = +1%).</li>
 * </ul>
 *
 * <p>Realistic effects the filter does not model, each its own record with a switch ({@code enabled})
 * and magnitudes whose defaults cite where they come from, all off in
 * {@link org.wayhold.simulate.SimulationSettings#defaults()}:
 * <ul>
 *   <li>gyro: {@link org.wayhold.simulate.GyroScale} (scale-factor error, 1.5%),
 *       {@link org.wayhold.simulate.GyroWarmUp} (bias settling from +0.3 deg/s, 300 s), and on grades
 *       the pitched sensor reads yaw rate * cos(grade);</li>
 *   <li>wheel: {@link org.wayhold.simulate.ToothCounting} (48 teeth, 2 m, blind below 0.3 m/s),
 *       {@link org.wayhold.simulate.WheelSlip} (brush tyre model), {@link org.wayhold.simulate.TyreGrowth}
 *       (0.75% at 33 m/s); the wheel rolls along the slope;</li>
 *   <li>GNSS: {@link org.wayhold.simulate.GnssLatency} (0.15 s), {@link org.wayhold.simulate.CanyonNlos}
 *       (5-30 m across the street, 30 s), the fix rate, the antenna lever arm;</li>
 *   <li>route: {@link org.wayhold.simulate.Hills}, {@link org.wayhold.simulate.Garage} (helical ramp),
 *       {@link org.wayhold.simulate.Queues} (creeping), {@link org.wayhold.simulate.HardLaunches},
 *       {@link org.wayhold.simulate.LongStops}, {@link org.wayhold.simulate.Motorway}; the drive reports
 *       where each happened as {@link org.wayhold.simulate.Zone} windows.</li>
 * </ul>
 * {@link org.wayhold.simulate.Scenario} names presets that switch them on (one per effect, and
 * {@code city} for several at once) for what-if studies over seeds.
 *
 * <p>Same settings and seed give bit-identical output: all randomness comes from one
 * {@link java.util.SplittableRandom} per seed, split into one stream per error source, and the
 * trigonometry uses {@link java.lang.StrictMath}. The streams of the newer effects are split after
 * the original ones, so a drive with those effects off is bit for bit what it was before they existed.
 *
 * <p>This package is part of the numerical core: it imports no web, JSON or YAML library.
 */
package org.wayhold.simulate;
