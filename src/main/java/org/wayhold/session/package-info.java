/**
 * One vehicle's pipeline (time ordering, filter, pose and history) and the registry of vehicles.
 *
 * <p>A session's whole state follows from its vehicle id, the settings and its ordered samples, so
 * that vehicles could later be spread over several instances by a partitioned log keyed by vehicle id.
 * Times are seconds on the vehicle's clock at this boundary; inside, the filter works relative to the
 * session epoch (the whole second of the first sample).
 */
package org.wayhold.session;
