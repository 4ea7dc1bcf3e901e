package org.wayhold.http;

import io.javalin.config.JavalinConfig;
import java.util.List;
import java.util.function.UnaryOperator;
import org.eclipse.jetty.server.HttpConnectionFactory;
import org.eclipse.jetty.server.ServerConnector;
import org.eclipse.jetty.server.handler.GracefulHandler;
import org.wayhold.settings.ServerSettings;

/**
 * The server set-up every service of this package shares: the service that keeps sessions and the read
 * service that serves a poses topic answer under the same limits, stop the same way and guard their
 * routes in the same order, so one place says how.
 */
final class ServerWiring {

    private ServerWiring() {
    }

    /**
     * Jetty and Javalin settings: request size, graceful stop, problem replies for errors Jetty answers
     * itself, idle timeouts, the listening connector, streams closed on stop, the list of routes (for
     * {@code Allow}) and CORS with the headers pages may read.
     *
     * @param routes         receives "METHOD path" of each route added
     * @param exposedHeaders response headers a page of another allowed origin may read
     */
    static void configure(JavalinConfig config, ServerSettings server, PoseStreams streams, List<String> routes,
                          List<String> exposedHeaders) {
        config.startup.showJavalinBanner = false;
        config.startup.showOldJavalinVersionWarning = false;
        config.http.prefer405over404 = true;
        config.http.maxRequestSize = server.maxBodyBytes();
        long idleMillis = Math.max(1L, Math.round(server.idleTimeoutS() * 1000.0));
        config.jetty.modifyServer(s -> {
            // Jetty 12 waits for requests in flight on stop only with a GracefulHandler in the chain.
            s.insertHandler(new GracefulHandler());
            s.setStopTimeout(HttpService.STOP_TIMEOUT_MS);
            // Errors Jetty answers before any route (bad request line, 414, 431, 503 while stopping).
            s.setErrorHandler(new ProblemErrorHandler());
        });
        // The idle timeout bounds each blocked read or write of a request (HttpConfiguration) and each
        // silent connection (the connector): a client that stops sending or reading is let go.
        config.jetty.modifyHttpConfiguration(http -> http.setIdleTimeout(idleMillis));
        config.jetty.addConnector((jetty, http) -> {
            ServerConnector c = new ServerConnector(jetty, new HttpConnectionFactory(http));
            c.setHost(server.bind());
            c.setPort(server.port());
            c.setIdleTimeout(idleMillis);
            return c;
        });
        config.events.serverStopping(streams::closeAll);
        config.events.handlerAdded(h -> {
            if (h.getHttpMethod().isHttpMethod()) {
                routes.add(h.getHttpMethod().name() + " " + h.getPath());
            }
        });
        if (!server.corsOrigins().isEmpty()) {
            config.bundledPlugins.enableCors(cors -> cors.addRule(rule -> {
                for (String origin : server.corsOrigins()) {
                    if (origin.equals("*")) {
                        rule.anyHost();
                    } else {
                        rule.allowHost(origin);
                    }
                }
                exposedHeaders.forEach(rule::exposeHeader);
            }));
        }
    }

    /**
     * The live view's files, then the guards every route passes in this order: problem replies for
     * errors, the origin check (a write from a page of a disallowed origin is refused unapplied), the
     * bearer token.
     *
     * @param allow the {@code Allow} header of a path
     */
    static void guard(JavalinConfig config, ServerSettings server, UploadSlots uploads, BearerTokens tokens,
                      UnaryOperator<String> allow) {
        LiveView.serve(config);
        ErrorMapping.install(config.routes, server.maxBodyBytes(), server.drainTimeoutS(), uploads, allow::apply);
        if (!server.corsOrigins().isEmpty()) {
            OriginRule origins = new OriginRule(server.corsOrigins());
            config.routes.before(origins::check);
        }
        config.routes.before(tokens::check);
    }

    /** {@code http://host:port} of a bound connector; an IPv6 host in brackets (RFC 3986, 3.2.2). */
    static String baseUrl(ServerSettings server, int port) {
        String host = server.bind();
        if (host.contains(":") && !host.startsWith("[")) {
            host = "[" + host + "]";
        }
        return "http://" + host + ":" + port;
    }
}
