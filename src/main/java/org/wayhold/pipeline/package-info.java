/**
 * One vehicle's pipeline, the same for the live service, offline scoring and the stream worker:
 * batches of samples, in any order, through time ordering ({@code ordering}) into a
 * {@link org.wayhold.pipeline.VehicleTrack} (session epoch, ENU frame, filter), out as poses and fix
 * decisions.
 *
 * <p>Times: seconds on the vehicle's clock at the edges; inside the filter, seconds since the session
 * epoch (the floor of the first applied sample's time). Positions: metres in the session's local
 * east-north-up frame, whose origin is the first fix with a solution unless one is configured.
 */
package org.wayhold.pipeline;
