/**
 * Seeded synthetic drives: a kinematic truth trajectory on an invented route, and sensor models that
 * sample it (wheel speed, yaw rate, GNSS, reference points).
 *
 * <p>Units and frames:
 * <ul>
 *   <li>The truth is planar, in a local ENU frame (metres; x east, y north) around a configurable
 *       WGS-84 origin. Yaw is radians counter-clockwise from east; yaw rate is rad/s, positive
 *       counter-clockwise seen from above. Headings and courses written into samples are degrees
 *       clockwise from true north.</li>
 *   <li>Absolute times ({@code t}, {@code startT}, {@code endT}) are epoch seconds on the vehicle's
 *       clock, about 1.8e9 by default so that precision bugs downstream show. Internally the drive is
 *       built on an integer grid of 10 ms ticks counted from the start, so every sample instant is
 *       exact; a timestamp is {@code startT + tick / 100.0}.</li>
 *   <li>Settings name their units: {@code Mps}, {@code Deg}, {@code DegPerS}, {@code M}, {@code S},
 *       {@code Hz}; scale errors are unitless fractions (0.01 = +1%).</li>
 * </ul>
 *
 * <p>Same settings and seed give bit-identical output: all randomness comes from one
 * {@link java.util.SplittableRandom} per seed, split into one stream per error source, and the
 * trigonometry uses {@link java.lang.StrictMath}.
 *
 * <p>This package is part of the numerical core: it imports no web, JSON or YAML library.
 */
package org.wayhold.simulate;
