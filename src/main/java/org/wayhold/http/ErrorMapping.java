package org.wayhold.http;

import io.javalin.config.RoutesConfig;
import io.javalin.http.Context;
import io.javalin.http.HandlerType;
import io.javalin.http.HttpResponseException;
import java.io.IOException;
import java.io.InputStream;
import org.eclipse.jetty.ee10.servlet.ServletContextRequest;
import org.eclipse.jetty.io.EndPoint;
import java.util.function.BiConsumer;
import java.util.function.Function;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;
import org.wayhold.session.SessionLimitException;
import org.wayhold.session.VehicleQuarantinedException;

/**
 * The one place where failures become HTTP responses: RFC 9457 problem details
 * ({@code application/problem+json}) with {@code type}, {@code title}, {@code status}, {@code detail}
 * (which names the field at fault), {@code instance} (the request path) and, when one field is to blame,
 * the extension member {@code field}.
 *
 * <p>Mapping: {@link HttpProblem} gives its own status; {@link SessionLimitException} and
 * {@link VehicleQuarantinedException} are 503; Javalin's
 * own {@link HttpResponseException}s keep their status; a path no route matches is 404 and a known path
 * with another method 405 (with {@code Allow}); anything else is 500 with a fixed detail, and its stack
 * trace goes to the server log only. CORS preflights ({@code OPTIONS} with
 * {@code Access-Control-Request-Method}) are left to the CORS plugin and never get a problem body.
 *
 * <p>A refusal that comes before the body is read (a missing token, a wrong media type, a rate limit,
 * a declared length over the limit) first reads and discards what is left of the body, up to
 * {@link #DRAIN_FACTOR} times the body size limit. Otherwise the server closes the connection with
 * unread bytes in its receive buffer; TCP then answers the client's further bytes with a reset, which
 * can destroy the reply before the client reads it (RFC 9112 sec. 9.6 describes this hazard and the
 * "lingering close" it calls for). Clients that send the whole body before reading, the JDK's own
 * among them, then saw no reply at all instead of the 401 or 413. A body beyond that bound is not read:
 * the reply closes the connection and says so ({@code Connection: close}); a client that wants to
 * learn of a refusal before sending the body sends {@code Expect: 100-continue} (RFC 9110 sec. 10.1.1).
 * The drain is bounded in time too ({@code server.drain_timeout_s}) and takes one of the upload slots
 * ({@link UploadSlots}); without a free slot, or past the deadline, the rest is not read and the
 * connection closes: refusals of slow bodies cannot hold the server's threads.
 *
 * <p>Errors that Jetty answers itself, before any route, are problem JSON too ({@link ProblemErrorHandler}).
 */
final class ErrorMapping {

    private static final Logger LOG = LoggerFactory.getLogger(ErrorMapping.class);
    static final String PROBLEM_JSON = "application/problem+json";
    private static final String WRITTEN = "wayhold.problem-written";
    /**
     * Most a refusal reads of a body, as a multiple of the body size limit (count): enough that a body
     * a little over the limit still gets its 413 on a kept connection, bounded so that a refused
     * request never costs more than twice the largest accepted one.
     */
    static final int DRAIN_FACTOR = 2;

    private ErrorMapping() {
    }

    /**
     * @param maxBodyBytes  the body size limit (bytes); a refusal reads up to DRAIN_FACTOR times it
     * @param drainTimeoutS longest time a refusal spends reading the rest of a body (s)
     * @param slots         the upload slots; a drain takes one, and none is read without it
     * @param allowed       the methods a path answers, as an {@code Allow} value (RFC 9110 sec. 10.2.1)
     */
    static void install(RoutesConfig routes, long maxBodyBytes, double drainTimeoutS, UploadSlots slots,
                        Function<String, String> allowed) {
        long drainNanos = Math.round(drainTimeoutS * 1e9);
        // Every problem reply first drops what is left of the request body (see the class comment).
        BiConsumer<Context, HttpProblem> reply = (ctx, p) -> {
            discardUnreadBody(ctx, maxBodyBytes, drainNanos, slots);
            write(ctx, p);
        };
        routes.exception(HttpProblem.class, (e, ctx) -> reply.accept(ctx, e));
        routes.exception(SessionLimitException.class, (e, ctx) -> reply.accept(ctx,
                HttpProblem.unavailable("vehicle", "vehicle: " + e.getMessage())));
        routes.exception(VehicleQuarantinedException.class, (e, ctx) -> reply.accept(ctx,
                HttpProblem.vehicleQuarantined(e.vehicleId(), e.reason())));
        routes.exception(HttpResponseException.class, (e, ctx) -> {
            if (isPreflight(ctx)) {
                // No route answers OPTIONS; the CORS plugin has set its headers, the answer is empty.
                ctx.status(204);
                ctx.result("");
                return;
            }
            switch (e.getStatus()) {
                case 404 -> reply.accept(ctx, notFound(ctx));
                case 405 -> reply.accept(ctx, methodNotAllowed(ctx, allowed));
                default -> reply.accept(ctx, new HttpProblem(e.getStatus(), "http-" + e.getStatus(),
                        titleOf(e.getStatus()), null, safeDetail(e)));
            }
        });
        routes.exception(Exception.class, (e, ctx) -> {
            LOG.error("{} {} failed", ctx.method(), ctx.path(), e);
            reply.accept(ctx, new HttpProblem(500, "internal", "Internal server error", null,
                    "the request could not be completed; the server log has the cause"));
        });
        routes.error(404, ctx -> {
            if (!written(ctx) && !isPreflight(ctx)) {
                reply.accept(ctx, notFound(ctx));
            }
        });
        routes.error(405, ctx -> {
            if (!written(ctx) && !isPreflight(ctx)) {
                reply.accept(ctx, methodNotAllowed(ctx, allowed));
            }
        });
    }

    private static HttpProblem notFound(Context ctx) {
        return new HttpProblem(404, "not-found", "Not found", "path",
                "path: no resource at " + ctx.method() + " " + ctx.path());
    }

    /** RFC 9110 sec. 15.5.6: a 405 carries {@code Allow} with the methods the resource does answer. */
    private static HttpProblem methodNotAllowed(Context ctx, Function<String, String> allowed) {
        String allow = allowed.apply(ctx.path());
        ctx.header("Allow", allow);
        return new HttpProblem(405, "method-not-allowed", "Method not allowed", "method",
                "method: " + ctx.method() + " is not allowed on " + ctx.path() + "; allowed: " + allow);
    }

    private static String safeDetail(HttpResponseException e) {
        // Javalin's own messages describe the request (for example a missing parameter), not the server.
        String m = e.getMessage();
        return m == null || m.isBlank() ? titleOf(e.getStatus()) : m;
    }

    static String titleOf(int status) {
        return switch (status) {
            case 400 -> "Bad request";
            case 401 -> "Unauthorized";
            case 403 -> "Forbidden";
            case 404 -> "Not found";
            case 405 -> "Method not allowed";
            case 413 -> "Request body too large";
            case 406 -> "Not acceptable";
            case 408 -> "Request timeout";
            case 409 -> "Conflict";
            case 414 -> "URI too long";
            case 422 -> "Unprocessable content";
            case 431 -> "Request header fields too large";
            case 415 -> "Unsupported media type";
            case 429 -> "Too many requests";
            case 503 -> "Service unavailable";
            default -> status >= 500 ? "Server error" : "Request error";
        };
    }

    static boolean isPreflight(Context ctx) {
        return ctx.method() == HandlerType.OPTIONS && ctx.header("Access-Control-Request-Method") != null;
    }

    /**
     * Reads and drops the rest of the request body, unless it is declared larger than
     * {@link #DRAIN_FACTOR} times {@code maxBodyBytes}; stops after that many bytes in any case, and
     * once {@code drainNanos} have passed: each blocking read waits no longer than what is left of that
     * time (the connection's idle timeout is lowered for the drain and put back after), so a client that
     * trickles its body cannot hold the thread. A drain needs an upload slot ({@link UploadSlots}): when
     * none is free nothing is read. Read errors and time-outs are ignored: the connection is then closed,
     * and the refusal is still written.
     */
    static void discardUnreadBody(Context ctx, long maxBodyBytes, long drainNanos, UploadSlots slots) {
        long declared = ctx.req().getContentLengthLong();
        boolean chunked = ctx.header("Transfer-Encoding") != null;
        if (declared == 0 || (declared < 0 && !chunked)) {
            return;
        }
        long drainBytes = maxBodyBytes > Long.MAX_VALUE / DRAIN_FACTOR ? Long.MAX_VALUE : DRAIN_FACTOR * maxBodyBytes;
        if (declared <= drainBytes && slots.tryAcquire()) {
            EndPoint endPoint = endPointOf(ctx);
            long idleMillis = endPoint == null ? 0 : endPoint.getIdleTimeout();
            try {
                InputStream in = ctx.req().getInputStream();
                byte[] buf = new byte[8192];
                long total = 0;
                long deadline = System.nanoTime() + drainNanos;
                while (total <= drainBytes) {
                    long leftMillis = (deadline - System.nanoTime()) / 1_000_000L;
                    if (leftMillis <= 0) {
                        break;
                    }
                    if (endPoint != null) {
                        endPoint.setIdleTimeout(Math.min(idleMillis, leftMillis));
                    }
                    int n = in.read(buf);
                    if (n < 0) {
                        return;
                    }
                    total += n;
                }
            } catch (IOException | RuntimeException e) {
                LOG.debug("{} {}: the rest of a refused body could not be read: {}", ctx.method(), ctx.path(),
                        e.toString());
            } finally {
                if (endPoint != null) {
                    endPoint.setIdleTimeout(idleMillis);
                }
                slots.release();
            }
        }
        // Bytes are left unread: the connection ends after this reply, and the reply says so, so that no
        // client sends its next request on it (a client that sent "Expect: 100-continue" has not sent
        // the body at all, and the server would otherwise take its next request for that body).
        ctx.header("Connection", "close");
    }

    /** The connection's end point, to bound a blocking read; null when Jetty does not say. */
    private static EndPoint endPointOf(Context ctx) {
        try {
            ServletContextRequest r = ServletContextRequest.getServletContextRequest(ctx.req());
            return r == null ? null : r.getConnectionMetaData().getConnection().getEndPoint();
        } catch (RuntimeException e) {
            return null;
        }
    }

    private static boolean written(Context ctx) {
        return Boolean.TRUE.equals(ctx.attribute(WRITTEN));
    }

    static void write(Context ctx, HttpProblem p) {
        ctx.attribute(WRITTEN, Boolean.TRUE);
        ctx.status(p.status());
        p.headers().forEach(ctx::header);
        ctx.header("Cache-Control", "no-store");
        ctx.contentType(PROBLEM_JSON);
        ctx.result(toBytes(p, ctx.path()));
    }

    static byte[] toBytes(HttpProblem p, String instance) {
        return PoseJson.document(256, g -> {
            g.writeStartObject();
            g.writeStringField("type", p.type());
            g.writeStringField("title", p.title());
            g.writeNumberField("status", p.status());
            g.writeStringField("detail", p.detail());
            g.writeStringField("instance", instance);
            if (p.field() != null) {
                g.writeStringField("field", p.field());
            }
            g.writeEndObject();
        });
    }
}
