package org.wayhold.http;

import io.javalin.http.Context;
import io.javalin.http.HandlerType;
import java.nio.charset.StandardCharsets;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import java.util.List;
import org.wayhold.settings.ServerSettings;

/**
 * Who may do what: bearer tokens (RFC 6750) in two scopes, checked before any route runs.
 *
 * <p>Rules:
 * <ul>
 *   <li>Writes (every method but GET, HEAD and OPTIONS, so POST and DELETE) need a write token when
 *       {@code server.write_tokens} is not empty.</li>
 *   <li>Reads (GET, HEAD) need a read token or a write token when {@code server.read_tokens} is not
 *       empty; a writer may always read what it wrote. {@code /metrics} is a read: it tells how many
 *       vehicles there are and how busy the service is.</li>
 *   <li>{@code /health}, {@code /health/live} and {@code /openapi.yaml} are always open: load balancers
 *       and orchestrators probe the first two without secrets, and the last is the public contract and
 *       holds no data.</li>
 *   <li>Reads of the live view's own files ({@code /} and its HTML, CSS and JavaScript, see
 *       {@link LiveView}) are open: they hold no data, and the page must load to ask for the token
 *       it then sends on every data request.</li>
 *   <li>{@code OPTIONS} is open: browsers send CORS preflights without credentials.</li>
 * </ul>
 * No usable token is 401 with a {@code WWW-Authenticate: Bearer} challenge; a read token on a write
 * is 403. Both are problem JSON from {@link ErrorMapping}.
 *
 * <p>Tokens are kept only as SHA-256 digests and a presented token is hashed and compared with every
 * configured digest by {@link MessageDigest#isEqual} (constant time for equal lengths, and digests are
 * always 32 bytes), without stopping at the first match, so the time taken does not reveal how much of
 * a guess was right or which list matched. Tokens are never logged or echoed in a reply.
 */
final class BearerTokens {

    /** What a presented token allows. */
    enum Scope { NONE, READ, WRITE }

    private static final List<String> ALWAYS_OPEN = List.of("/health", "/health/live", "/openapi.yaml");

    private final byte[][] writeDigests;
    private final byte[][] readDigests;

    BearerTokens(ServerSettings server) {
        this.writeDigests = digests(server.writeTokens());
        this.readDigests = digests(server.readTokens());
    }

    /** Javalin before-handler: returns when the request may go on, throws a 401 or 403 problem otherwise. */
    void check(Context ctx) {
        HandlerType method = ctx.method();
        boolean read = method == HandlerType.GET || method == HandlerType.HEAD;
        String path = ctx.path();
        if (method == HandlerType.OPTIONS || ALWAYS_OPEN.contains(path)) {
            return;
        }
        if (read ? readDigests.length == 0 : writeDigests.length == 0) {
            return;
        }
        if (read && LiveView.isPageFile(path)) {
            return;
        }
        String header = ctx.header("Authorization");
        String token = bearerToken(header);
        if (token == null) {
            throw HttpProblem.unauthorized(header == null
                    ? "a bearer token is required for " + (read ? "reads" : "writes")
                    : "must be 'Bearer' followed by a token", header != null);
        }
        Scope scope = scopeOf(token);
        if (scope == Scope.NONE) {
            throw HttpProblem.unauthorized("the bearer token is not recognised", true);
        }
        if (!read && scope != Scope.WRITE) {
            throw HttpProblem.forbidden("this token may read but not write; "
                    + method.name() + " needs a write token");
        }
    }

    /** The scope of a presented token; every configured digest is compared, whatever matched before. */
    Scope scopeOf(String token) {
        byte[] presented = sha256(token);
        boolean write = false;
        boolean readOnly = false;
        for (byte[] d : writeDigests) {
            write |= MessageDigest.isEqual(presented, d);
        }
        for (byte[] d : readDigests) {
            readOnly |= MessageDigest.isEqual(presented, d);
        }
        return write ? Scope.WRITE : readOnly ? Scope.READ : Scope.NONE;
    }

    /**
     * The token of an {@code Authorization: Bearer TOKEN} header, or null when the header is missing or
     * of another form. The scheme name is case-insensitive (RFC 9110 sec. 11.1).
     */
    static String bearerToken(String header) {
        if (header == null) {
            return null;
        }
        String h = header.strip();
        if (h.length() < 7 || !h.regionMatches(true, 0, "Bearer ", 0, 7)) {
            return null;
        }
        String token = h.substring(7).strip();
        return token.isEmpty() || token.indexOf(' ') >= 0 ? null : token;
    }

    private static byte[][] digests(List<String> tokens) {
        byte[][] d = new byte[tokens.size()][];
        for (int i = 0; i < d.length; i++) {
            d[i] = sha256(tokens.get(i));
        }
        return d;
    }

    private static byte[] sha256(String text) {
        try {
            return MessageDigest.getInstance("SHA-256").digest(text.getBytes(StandardCharsets.UTF_8));
        } catch (NoSuchAlgorithmException e) {
            // Every Java platform must provide SHA-256 (java.security.MessageDigest, "Standard Algorithms").
            throw new IllegalStateException("SHA-256 is missing from this Java runtime", e);
        }
    }
}
