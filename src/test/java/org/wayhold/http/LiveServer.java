package org.wayhold.http;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.time.Duration;
import java.util.List;
import org.wayhold.session.SessionRegistry;
import org.wayhold.settings.ServerSettings;
import org.wayhold.settings.Settings;

/**
 * A real service on a free loopback port and a plain JDK HTTP client, for the HTTP tests. No part of
 * the service is mocked. One per test class: starting and stopping Jetty costs about a second.
 */
final class LiveServer implements AutoCloseable {

    static final ObjectMapper JSON = new ObjectMapper();

    final SessionRegistry sessions;
    final HttpService service;
    final HttpClient client = HttpClient.newBuilder().connectTimeout(Duration.ofSeconds(5)).build();

    LiveServer(Settings settings) {
        this(settings, java.time.Clock.systemUTC());
    }

    /** A service whose sessions judge arrivals and staleness by {@code clock}. */
    LiveServer(Settings settings, java.time.Clock clock) {
        this.sessions = new SessionRegistry(settings, null, org.wayhold.session.SessionLog.NONE, clock);
        this.service = new HttpService(sessions).start();
    }

    /** Defaults with port 0 and the given changes to the server section. */
    static Settings settings(java.util.function.UnaryOperator<ServerSettings> change) {
        Settings d = Settings.defaults();
        ServerSettings s = d.server();
        ServerSettings port0 = s.withAddress(0, "127.0.0.1");
        return new Settings(change.apply(port0), d.filter(), d.gating(), d.outage(), d.ordering(), d.history(),
                d.vehicles());
    }

    static ServerSettings withLimits(ServerSettings s, long maxBodyBytes, int maxSessions, List<String> cors,
                                     double keepAliveS) {
        return new ServerSettings(s.port(), s.bind(), s.writeTokens(), s.readTokens(), maxBodyBytes, s.maxLineBytes(),
                s.maxSamplesPerRequest(), maxSessions, s.maxVehicleIdChars(), s.maxSamplesPerSecondPerVehicle(),
                s.rateBurstS(), cors, keepAliveS, s.idleTimeoutS(), s.minBodyBytesPerS(), s.drainTimeoutS(), s.maxConcurrentUploads(), s.maxStreams());
    }

    URI uri(String pathAndQuery) {
        return URI.create(service.baseUrl() + pathAndQuery);
    }

    HttpRequest.Builder request(String pathAndQuery) {
        return HttpRequest.newBuilder(uri(pathAndQuery)).timeout(Duration.ofSeconds(30));
    }

    HttpResponse<String> send(HttpRequest request) {
        try {
            return client.send(request, HttpResponse.BodyHandlers.ofString());
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            throw new IllegalStateException(e);
        }
    }

    HttpResponse<String> get(String pathAndQuery) {
        return send(request(pathAndQuery).GET().build());
    }

    HttpResponse<String> postNdjson(String vehicle, byte[] body) {
        return send(request("/v1/vehicles/" + vehicle + "/samples").header("Content-Type", "application/x-ndjson")
                .POST(HttpRequest.BodyPublishers.ofByteArray(body)).build());
    }

    HttpResponse<String> post(String path, String contentType, String body) {
        return send(request(path).header("Content-Type", contentType)
                .POST(HttpRequest.BodyPublishers.ofString(body)).build());
    }

    HttpResponse<String> delete(String path) {
        return send(request(path).DELETE().build());
    }

    /**
     * A latest pose's JSON without the vehicle's liveness ({@code received_at}, {@code stale}), which
     * follows the service's wall clock and not the samples: for comparing the poses of two vehicles fed
     * the same data, or of one vehicle across a restart.
     */
    static String withoutLiveness(String poseJson) {
        return poseJson.replaceFirst(",\"received_at\":[^,]*,\"stale\":(true|false)}$", "}");
    }

    static JsonNode json(HttpResponse<String> r) {
        try {
            return JSON.readTree(r.body());
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    @Override
    public void close() {
        service.stop();
    }
}
