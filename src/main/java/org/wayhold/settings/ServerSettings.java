package org.wayhold.settings;

import java.util.List;

/**
 * The HTTP service. YAML section {@code server}.
 *
 * @param port                  TCP port (1..65535; 0 picks a free port, for tests)
 * @param bind                  address to listen on; loopback by default
 * @param writeTokens           bearer tokens allowed to POST and DELETE; empty means no write check
 * @param readTokens            bearer tokens allowed to GET; empty means reads are open
 * @param maxBodyBytes          largest accepted request body (bytes)
 * @param maxLineBytes          longest accepted NDJSON line (bytes)
 * @param maxSamplesPerRequest  most samples in one request (count)
 * @param maxSessions           most vehicle sessions held at once (count)
 * @param maxSamplesPerSecondPerVehicle sustained ingest rate allowed per vehicle (samples per second of wall time)
 * @param corsOrigins           origins allowed by CORS; empty means none
 * @param sseKeepAliveS         interval of Server-Sent Events keep-alive comments (s)
 */
public record ServerSettings(int port, String bind, List<String> writeTokens, List<String> readTokens,
                             long maxBodyBytes, int maxLineBytes, int maxSamplesPerRequest, int maxSessions,
                             double maxSamplesPerSecondPerVehicle, List<String> corsOrigins,
                             double sseKeepAliveS) {

    public ServerSettings {
        if (port < 0 || port > 65535) {
            throw new IllegalArgumentException("server.port: must be 0..65535, was " + port);
        }
        if (bind == null || bind.isBlank()) {
            throw new IllegalArgumentException("server.bind: must name an address, was '" + bind + "'");
        }
        writeTokens = List.copyOf(writeTokens == null ? List.of() : writeTokens);
        readTokens = List.copyOf(readTokens == null ? List.of() : readTokens);
        corsOrigins = List.copyOf(corsOrigins == null ? List.of() : corsOrigins);
        if (maxBodyBytes < 1) {
            throw new IllegalArgumentException("server.max_body_bytes: must be at least 1, was " + maxBodyBytes);
        }
        Check.atLeast("server.max_line_bytes", maxLineBytes, 64);
        Check.atLeast("server.max_samples_per_request", maxSamplesPerRequest, 1);
        Check.atLeast("server.max_sessions", maxSessions, 1);
        Check.positive("server.max_samples_per_second_per_vehicle", maxSamplesPerSecondPerVehicle);
        Check.positive("server.sse_keep_alive_s", sseKeepAliveS);
    }

    public static ServerSettings defaults() {
        return new ServerSettings(8470, "127.0.0.1", List.of(), List.of(), 64L * 1024 * 1024, 4096,
                1_000_000, 10_000, 100_000.0, List.of(), 15.0);
    }
}
