package org.wayhold.http;

import io.javalin.http.Context;
import java.util.List;
import java.util.Locale;

/**
 * With {@code server.cors_origins} set, requests that a browser sends from a page of another origin
 * must come from one of them. Checked before any route runs, so that a write from a disallowed origin
 * is refused before a single sample is applied: the CORS headers alone only stop the page from reading
 * the reply, not the request from taking effect (a plain POST needs no preflight).
 *
 * <p>Allowed: no {@code Origin} header (not a browser's cross-origin request); an origin on the list,
 * compared without regard to case (RFC 6454 sec. 6.2 serialises scheme and host in lower case);
 * {@code *} on the list; the service's own origin (its live view); and CORS preflights, which the CORS
 * plugin answers. Anything else is 403 problem JSON naming the header.
 */
final class OriginRule {

    private final List<String> allowed;
    private final boolean any;

    OriginRule(List<String> corsOrigins) {
        this.allowed = corsOrigins.stream().map(o -> o.strip().toLowerCase(Locale.ROOT)).toList();
        this.any = allowed.contains("*");
    }

    /** Javalin before-handler: returns when the request may go on, throws a 403 problem otherwise. */
    void check(Context ctx) {
        String origin = ctx.header("Origin");
        if (origin == null || any || ErrorMapping.isPreflight(ctx)) {
            return;
        }
        String o = origin.strip().toLowerCase(Locale.ROOT);
        if (allowed.contains(o) || o.equals(ownOrigin(ctx))) {
            return;
        }
        throw new HttpProblem(403, "origin-not-allowed", "Forbidden", "Origin", "Origin: '"
                + VehicleRoutes.clip(origin) + "' is not allowed (server.cors_origins); nothing was applied");
    }

    /** scheme://host[:port] of the request itself, lower case, or null without a Host header. */
    private static String ownOrigin(Context ctx) {
        String host = ctx.header("Host");
        return host == null ? null : (ctx.scheme() + "://" + host.strip()).toLowerCase(Locale.ROOT);
    }
}
