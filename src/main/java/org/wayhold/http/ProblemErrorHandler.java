package org.wayhold.http;

import java.nio.ByteBuffer;
import org.eclipse.jetty.http.HttpHeader;
import org.eclipse.jetty.server.Request;
import org.eclipse.jetty.server.Response;
import org.eclipse.jetty.server.handler.ErrorHandler;
import org.eclipse.jetty.util.Callback;

/**
 * Jetty's error pages as RFC 9457 problem details. Errors that Jetty answers itself, before any route
 * runs, come here: a request line or header it cannot parse (400), a URI or a header block over its
 * limits (414, 431), and a request refused while the server stops (503). Without this they would be
 * HTML pages, unlike every other error of the service ({@link ErrorMapping}).
 *
 * <p>The detail is Jetty's reason phrase, which describes the request (never the server), or the
 * status title when there is none; the instance is the request path when Jetty could read one.
 */
final class ProblemErrorHandler extends ErrorHandler {

    @Override
    protected void generateResponse(Request request, Response response, int code, String message, Throwable cause,
                                    Callback callback) {
        String path = null;
        try {
            path = request.getHttpURI() == null ? null : request.getHttpURI().getPath();
        } catch (RuntimeException e) {
            // An unparsable target has no path to name.
        }
        String title = ErrorMapping.titleOf(code);
        String detail = message == null || message.isBlank() || message.equals(String.valueOf(code))
                ? title : message;
        HttpProblem problem = new HttpProblem(code, "http-" + code, title, null, detail);
        byte[] json = ErrorMapping.toBytes(problem, path == null || path.isEmpty() ? "/" : path);
        response.getHeaders().put(HttpHeader.CONTENT_TYPE, ErrorMapping.PROBLEM_JSON);
        response.getHeaders().put(HttpHeader.CACHE_CONTROL, "no-store");
        response.getHeaders().put(HttpHeader.CONTENT_LENGTH, json.length);
        response.write(true, ByteBuffer.wrap(json), callback);
    }
}
