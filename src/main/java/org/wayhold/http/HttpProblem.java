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

    /**
     * @param status HTTP status code
     * @param slug   last part of the type URI, such as {@code invalid-parameter}
     * @param title  short, fixed summary of the problem type
     * @param field  the request field at fault (path or query parameter, header, body), or null
     * @param detail what was wrong with this request, starting with the field name when there is one
     */
    HttpProblem(int status, String slug, String title, String field, String detail) {
        super(detail, null, false, false);
        this.status = status;
        this.type = TYPE_BASE + slug;
        this.title = title;
        this.field = field;
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
     * The journal could not make accepted samples durable. They may be applied in memory, but the
     * client was not told so and must send them again (duplicates are ignored).
     */
    static HttpProblem journalUnavailable(java.io.IOException cause) {
        return new HttpProblem(503, "journal-unavailable", "Service unavailable", null,
                "the samples could not be written to the journal (" + cause.getClass().getSimpleName()
                        + "), so they are not acknowledged; send them again later");
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

    /** The request field at fault, or null. */
    String field() {
        return field;
    }

    String detail() {
        return getMessage();
    }
}
