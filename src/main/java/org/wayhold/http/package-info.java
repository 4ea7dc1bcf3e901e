/**
 * The HTTP edge of wayhold (Javalin): routes, JSON and GeoJSON writing, Server-Sent Events, metrics and
 * RFC 9457 problem responses. The only package besides ingest and config that uses a web or JSON
 * library.
 *
 * <p>Units and frames on the wire follow the interface contract: times {@code t}, {@code at},
 * {@code from}, {@code to} are seconds on the vehicle's own clock; latitude and longitude WGS-84
 * degrees; {@code east/north/up} metres in the session's ENU frame; {@code heading_deg} degrees
 * clockwise from true north; {@code yaw_rate} rad/s counter-clockwise; covariances m^2. GeoJSON
 * positions are [longitude, latitude] (RFC 7946); projected {@code x}, {@code y} are in the units of
 * the requested EPSG CRS (metres for UTM).
 */
package org.wayhold.http;
