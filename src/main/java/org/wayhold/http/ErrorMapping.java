package org.wayhold.http;

import com.fasterxml.jackson.core.JsonGenerator;
import io.javalin.config.RoutesConfig;
import io.javalin.http.Context;
import io.javalin.http.HandlerType;
import io.javalin.http.HttpResponseException;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.UncheckedIOException;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;
import org.wayhold.session.SessionLimitException;

/**
 * The one place where failures become HTTP responses: RFC 9457 problem details
 * ({@code application/problem+json}) with {@code type}, {@code title}, {@code status}, {@code detail}
 * (which names the field at fault), {@code instance} (the request path) and, when one field is to blame,
 * the extension member {@code field}.
 *
 * <p>Mapping: {@link HttpProblem} gives its own status; {@link SessionLimitException} is 503; Javalin's
 * own {@link HttpResponseException}s keep their status; a path no route matches is 404 and a known path
 * with another method 405 (with {@code Allow}); anything else is 500 with a fixed detail, and its stack
 * trace goes to the server log only. CORS preflights ({@code OPTIONS} with
 * {@code Access-Control-Request-Method}) are left to the CORS plugin and never get a problem body.
 */
final class ErrorMapping {

    private static final Logger LOG = LoggerFactory.getLogger(ErrorMapping.class);
    static final String PROBLEM_JSON = "application/problem+json";
    private static final String WRITTEN = "wayhold.problem-written";

    private ErrorMapping() {
    }

    static void install(RoutesConfig routes) {
        routes.exception(HttpProblem.class, (e, ctx) -> write(ctx, e));
        routes.exception(SessionLimitException.class, (e, ctx) -> write(ctx,
                HttpProblem.unavailable("vehicle", "vehicle: " + e.getMessage())));
        routes.exception(HttpResponseException.class, (e, ctx) -> {
            if (isPreflight(ctx)) {
                // No route answers OPTIONS; the CORS plugin has set its headers, the answer is empty.
                ctx.status(204);
                ctx.result("");
                return;
            }
            switch (e.getStatus()) {
                case 404 -> write(ctx, notFound(ctx));
                case 405 -> write(ctx, methodNotAllowed(ctx));
                default -> write(ctx, new HttpProblem(e.getStatus(), "http-" + e.getStatus(), titleOf(e.getStatus()),
                        null, safeDetail(e)));
            }
        });
        routes.exception(Exception.class, (e, ctx) -> {
            LOG.error("{} {} failed", ctx.method(), ctx.path(), e);
            write(ctx, new HttpProblem(500, "internal", "Internal server error", null,
                    "the request could not be completed; the server log has the cause"));
        });
        routes.error(404, ctx -> {
            if (!written(ctx) && !isPreflight(ctx)) {
                write(ctx, notFound(ctx));
            }
        });
        routes.error(405, ctx -> {
            if (!written(ctx) && !isPreflight(ctx)) {
                write(ctx, methodNotAllowed(ctx));
            }
        });
    }

    private static HttpProblem notFound(Context ctx) {
        return new HttpProblem(404, "not-found", "Not found", "path",
                "path: no resource at " + ctx.method() + " " + ctx.path());
    }

    private static HttpProblem methodNotAllowed(Context ctx) {
        return new HttpProblem(405, "method-not-allowed", "Method not allowed", "method",
                "method: " + ctx.method() + " is not allowed on " + ctx.path());
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
            case 415 -> "Unsupported media type";
            case 429 -> "Too many requests";
            case 503 -> "Service unavailable";
            default -> status >= 500 ? "Server error" : "Request error";
        };
    }

    static boolean isPreflight(Context ctx) {
        return ctx.method() == HandlerType.OPTIONS && ctx.header("Access-Control-Request-Method") != null;
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
        ByteArrayOutputStream out = new ByteArrayOutputStream(256);
        try (JsonGenerator g = PoseJson.FACTORY.createGenerator(out)) {
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
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return out.toByteArray();
    }
}
