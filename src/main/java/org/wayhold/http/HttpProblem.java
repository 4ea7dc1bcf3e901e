package org.wayhold.http;

/**
 * A request that cannot be served, as an RFC 9457 problem: the status, a type URI, a short title and a
 * detail that names the field at fault.
 *
 * <p>Thrown by the handlers and turned into {@code application/problem+json} in one place,
 * {@link ErrorMapping}. The detail is written for the client: it never holds a stack trace or a
 * server-side path.
 */
final class HttpProblem extends RuntimeException {

    /** Base of this service's problem type URIs (RFC 9457 sec. 3.1.1: a URI that identifies the type). */
    static final String TYPE_BASE = "urn:wayhold:problem:";

    private final int status;
    private final String type;
    private final String title;
    private final String field;
    private final java.util.Map<String, String> headers;

    /**
     * @param status HTTP status code
     * @param slug   last part of the type URI, such as {@code invalid-parameter}
     * @param title  short, fixed summary of the problem type
     * @param field  the request field at fault (path or query parameter, header, body), or null
     * @param detail what was wrong with this request, starting with the field name when there is one
     */
    HttpProblem(int status, String slug, String title, String field, String detail) {
        this(status, slug, title, field, detail, java.util.Map.of());
    }

    /** As above, with response headers that belong to the problem ({@code Retry-After}, {@code WWW-Authenticate}). */
    HttpProblem(int status, String slug, String title, String field, String detail,
                java.util.Map<String, String> headers) {
        super(detail, null, false, false);
        this.status = status;
        this.type = TYPE_BASE + slug;
        this.title = title;
        this.field = field;
        this.headers = java.util.Map.copyOf(headers);
    }

    static HttpProblem invalidParameter(String field, String detail) {
        return new HttpProblem(400, "invalid-parameter", "Invalid request parameter", field, field + ": " + detail);
    }

    static HttpProblem unknownVehicle(String vehicleId) {
        return new HttpProblem(404, "unknown-vehicle", "Unknown vehicle", "vehicle",
                "vehicle: no session for '" + vehicleId + "'; a session starts with the vehicle's first sample");
    }

    static HttpProblem noPose(String field, String detail) {
        return new HttpProblem(404, "no-pose", "No pose", field, field + ": " + detail);
    }

    static HttpProblem bodyTooLarge(String detail) {
        return new HttpProblem(413, "body-too-large", "Request body too large", "body", "body: " + detail);
    }

    static HttpProblem unsupportedMediaType(String contentType) {
        return new HttpProblem(415, "unsupported-media-type", "Unsupported media type", "Content-Type",
                "Content-Type: must be application/x-ndjson or application/json, was "
                        + (contentType == null || contentType.isBlank() ? "missing" : "'" + contentType + "'"));
    }

    static HttpProblem unavailable(String field, String detail) {
        return new HttpProblem(503, "unavailable", "Service unavailable", field, detail);
    }

    /**
     * 503 for a request that may succeed a moment later (too many uploads at once), with a
     * {@code Retry-After} of one second (RFC 9110 sec. 10.2.3 and 15.6.4).
     */
    static HttpProblem busy(String field, String detail) {
        return new HttpProblem(503, "busy", "Service unavailable", field, detail, java.util.Map.of("Retry-After", "1"));
    }

    /** 408: the body arrived too slowly (RFC 9110 sec. 15.5.9); the connection is closed after it. */
    static HttpProblem bodyTooSlow(String detail) {
        return new HttpProblem(408, "body-too-slow", "Request timeout", "body", "body: " + detail,
                java.util.Map.of("Connection", "close"));
    }

    /** 409: the request conflicts with one being served (RFC 9110 sec. 15.5.10). */
    static HttpProblem conflict(String field, String detail) {
        return new HttpProblem(409, "conflict", "Conflict", field, detail);
    }

    /**
     * 415 for a content coding the service cannot decode; {@code Accept-Encoding} says which it can
     * (RFC 9110 sec. 12.5.3: a server may send it in a 415 for that reason).
     */
    static HttpProblem unsupportedEncoding(String contentEncoding) {
        return new HttpProblem(415, "unsupported-content-encoding", "Unsupported media type", "Content-Encoding",
                "Content-Encoding: must be gzip or identity (or absent), was '" + VehicleRoutes.clip(contentEncoding)
                        + "'", java.util.Map.of("Accept-Encoding", "gzip"));
    }

    /**
     * 401: no usable credentials. RFC 6750 sec. 3: the challenge names the scheme, and {@code error} says
     * whether a token was sent and not recognised ({@code invalid_token}) or none was sent (no error code).
     */
    static HttpProblem unauthorized(String detail, boolean tokenWasSent) {
        String challenge = tokenWasSent
                ? "Bearer realm=\"wayhold\", error=\"invalid_token\""
                : "Bearer realm=\"wayhold\"";
        return new HttpProblem(401, "unauthorized", "Unauthorized", "Authorization", "Authorization: " + detail,
                java.util.Map.of("WWW-Authenticate", challenge));
    }

    /** 403: a recognised token whose scope does not cover the request (RFC 6750 sec. 3.1, insufficient_scope). */
    static HttpProblem forbidden(String detail) {
        return new HttpProblem(403, "forbidden", "Forbidden", "Authorization", "Authorization: " + detail,
                java.util.Map.of("WWW-Authenticate",
                        "Bearer realm=\"wayhold\", error=\"insufficient_scope\", scope=\"write\""));
    }

    /** 429 with the whole seconds to wait (RFC 6585 sec. 4; Retry-After as delay-seconds, RFC 9110 sec. 10.2.3). */
    static HttpProblem tooManyRequests(String field, String detail, long retryAfterS) {
        return new HttpProblem(429, "too-many-requests", "Too many requests", field, field + ": " + detail,
                java.util.Map.of("Retry-After", Long.toString(retryAfterS)));
    }

    /**
     * The journal could not make a change durable (accepted samples, a deletion). It may be applied in
     * memory, but the client was not told so and must send the request again (duplicate samples are
     * ignored). The detail names no Java class: problem details are for clients (RFC 9457 sec. 3.1.4);
     * the server log has the cause.
     */
    static HttpProblem journalUnavailable() {
        return new HttpProblem(503, "journal-unavailable", "Service unavailable", null,
                "the change could not be written to the journal, so it is not acknowledged; send the request"
                        + " again later (the server log has the cause)");
    }

    /**
     * 503: the vehicle's session is quarantined (its state could not be trusted); every other vehicle is
     * served. Deleting the vehicle ends the quarantine and its next sample starts a fresh session.
     */
    static HttpProblem vehicleQuarantined(String vehicleId, String reason) {
        return new HttpProblem(503, "vehicle-quarantined", "Vehicle quarantined", "vehicle",
                "vehicle: the session of '" + vehicleId + "' is quarantined (" + reason + "); DELETE the vehicle"
                        + " to start it afresh");
    }

    int status() {
        return status;
    }

    String type() {
        return type;
    }

    String title() {
        return title;
    }

    /** Response headers that go with this problem. */
    java.util.Map<String, String> headers() {
        return headers;
    }

    /** The request field at fault, or null. */
    String field() {
        return field;
    }

    String detail() {
        return getMessage();
    }
}
