package org.wayhold.settings;

import java.util.List;

/**
 * The HTTP service. YAML section {@code server}.
 *
 * <p>The limits bound what one client can cost the service: bytes per request ({@code maxBodyBytes},
 * {@code maxLineBytes}), samples per request, memory ({@code maxSessions}, each session holding at most
 * {@code history.max_poses} poses) and filter time per vehicle ({@code maxSamplesPerSecondPerVehicle},
 * a token bucket on wall-clock time that holds {@code rateBurstS} seconds of that rate).
 *
 * @param port                  TCP port (1..65535; 0 picks a free port, for tests)
 * @param bind                  address to listen on; loopback by default
 * @param writeTokens           bearer tokens allowed to POST and DELETE (and to read); empty means no write check
 * @param readTokens            bearer tokens allowed to GET; empty means reads are open
 * @param maxBodyBytes          largest accepted request body (bytes)
 * @param maxLineBytes          longest accepted NDJSON line (bytes)
 * @param maxSamplesPerRequest  most samples in one request (count)
 * @param maxSessions           most vehicle sessions held at once (count)
 * @param maxVehicleIdChars     longest vehicle id (characters, 1..{@value #VEHICLE_ID_CHARS_CEILING})
 * @param maxSamplesPerSecondPerVehicle sustained ingest rate allowed per vehicle (samples per second of wall time)
 * @param rateBurstS            size of each vehicle's token bucket, as seconds of the sustained rate (s)
 * @param corsOrigins           origins allowed by CORS; empty means none
 * @param sseKeepAliveS         interval of Server-Sent Events keep-alive comments (s)
 * @param idleTimeoutS          a connection with nothing read or written for this long is closed (s);
 *                              it bounds every blocked read of a request and every blocked write of a reply
 * @param minBodyBytesPerS      slowest accepted request body after its first {@value #BODY_GRACE_S} s
 *                              (bytes per second of wall time); a slower one is cut with 408
 * @param drainTimeoutS         longest time a refused request's unread body is read and dropped (s)
 * @param maxConcurrentUploads  request bodies read at once (count); one more gets 503 with Retry-After,
 *                              so that slow uploads cannot hold every server thread
 * @param maxStreams            open Server-Sent Events pose streams (count)
 */
public record ServerSettings(int port, String bind, List<String> writeTokens, List<String> readTokens,
                             long maxBodyBytes, int maxLineBytes, int maxSamplesPerRequest, int maxSessions,
                             int maxVehicleIdChars, double maxSamplesPerSecondPerVehicle, double rateBurstS,
                             List<String> corsOrigins, double sseKeepAliveS, double idleTimeoutS,
                             long minBodyBytesPerS, double drainTimeoutS, int maxConcurrentUploads, int maxStreams) {

    /**
     * Time a request body may take before {@code minBodyBytesPerS} applies (s): a client's first packets
     * and a slow start of TCP on a long path, about a few round trips, are not held against it.
     */
    public static final double BODY_GRACE_S = 2.0;

    /**
     * Upper bound of {@code maxVehicleIdChars} (characters): ids appear in paths, logs, metric labels and
     * file names, and 255 is the usual file name limit of Linux file systems.
     */
    public static final int VEHICLE_ID_CHARS_CEILING = 255;

    public ServerSettings {
        if (port < 0 || port > 65535) {
            throw new SettingsException("server.port", "must be 0..65535, was " + port);
        }
        if (bind == null || bind.isBlank()) {
            throw new SettingsException("server.bind", "must name an address, was '" + bind + "'");
        }
        writeTokens = tokens("server.write_tokens", writeTokens);
        readTokens = tokens("server.read_tokens", readTokens);
        corsOrigins = List.copyOf(corsOrigins == null ? List.of() : corsOrigins);
        if (maxBodyBytes < 1) {
            throw new SettingsException("server.max_body_bytes", "must be at least 1, was " + maxBodyBytes);
        }
        Check.atLeast("server.max_line_bytes", maxLineBytes, 64);
        Check.atLeast("server.max_samples_per_request", maxSamplesPerRequest, 1);
        Check.atLeast("server.max_sessions", maxSessions, 1);
        Check.atLeast("server.max_vehicle_id_chars", maxVehicleIdChars, 1);
        if (maxVehicleIdChars > VEHICLE_ID_CHARS_CEILING) {
            throw new SettingsException("server.max_vehicle_id_chars", "must be at most "
                    + VEHICLE_ID_CHARS_CEILING + " characters, was " + maxVehicleIdChars);
        }
        Check.positive("server.max_samples_per_second_per_vehicle", maxSamplesPerSecondPerVehicle);
        Check.positive("server.rate_burst_s", rateBurstS);
        Check.positive("server.sse_keep_alive_s", sseKeepAliveS);
        Check.positive("server.idle_timeout_s", idleTimeoutS);
        if (sseKeepAliveS >= idleTimeoutS) {
            // An idle stream is kept open by its keep-alive comments: they must come before the timeout.
            throw new SettingsException("server.sse_keep_alive_s", "must be shorter than server.idle_timeout_s ("
                    + idleTimeoutS + " s), was " + sseKeepAliveS + " s");
        }
        if (minBodyBytesPerS < 0) {
            throw new SettingsException("server.min_body_bytes_per_s", "must be at least 0, was " + minBodyBytesPerS);
        }
        Check.positive("server.drain_timeout_s", drainTimeoutS);
        Check.atLeast("server.max_concurrent_uploads", maxConcurrentUploads, 1);
        Check.atLeast("server.max_streams", maxStreams, 0);
    }

    /**
     * Defaults. The rate: replaying a recorded drive 100 times faster than real time must pass, and the
     * demo drives carry 165 samples per second (100 Hz yaw rate, 50 Hz wheel speed, 5 Hz GNSS, 10 Hz
     * reference), so 16,500 samples/s; 100,000 samples/s leaves room for richer rigs. The bucket holds 2 s of that rate,
     * enough for one large batch.
     *
     * <p>Sessions: a session at its full default history of 600 poses holds about 190 KB (measured with
     * the test-scope {@code SessionMemoryMain}: about 197 B per pose and 57 B per fix held in columns,
     * and about 40 KB for time ordering with its checkpoints and the filter), so 1000 sessions bound the
     * sessions' heap to about 0.2 GB.
     *
     * <p>Slow clients: 30 s without a byte is far beyond any live client's pause (the pose streams send a
     * keep-alive every 15 s); 1024 bytes per second is about 12 sample lines a second, slower than any
     * logging rig posts; 64 uploads at once stay well below the server's 250 threads (Javalin's default
     * pool), so reads of poses and {@code /health} always find a thread; 256 streams each hold a thread
     * of their own.
     */
    public static ServerSettings defaults() {
        return new ServerSettings(8470, "127.0.0.1", List.of(), List.of(), 64L * 1024 * 1024, 4096,
                1_000_000, 1_000, 64, 100_000.0, 2.0, List.of(), 15.0, 30.0, 1024, 2.0, 64, 256);
    }

    /** The same settings listening on another port and address. */
    public ServerSettings withAddress(int newPort, String newBind) {
        return new ServerSettings(newPort, newBind, writeTokens, readTokens, maxBodyBytes, maxLineBytes,
                maxSamplesPerRequest, maxSessions, maxVehicleIdChars, maxSamplesPerSecondPerVehicle, rateBurstS,
                corsOrigins, sseKeepAliveS, idleTimeoutS, minBodyBytesPerS, drainTimeoutS, maxConcurrentUploads,
                maxStreams);
    }

    /** The same settings with other tokens. */
    public ServerSettings withTokens(List<String> newWriteTokens, List<String> newReadTokens) {
        return new ServerSettings(port, bind, newWriteTokens, newReadTokens, maxBodyBytes, maxLineBytes,
                maxSamplesPerRequest, maxSessions, maxVehicleIdChars, maxSamplesPerSecondPerVehicle, rateBurstS,
                corsOrigins, sseKeepAliveS, idleTimeoutS, minBodyBytesPerS, drainTimeoutS, maxConcurrentUploads,
                maxStreams);
    }

    /** True when writes need a token. */
    public boolean writesNeedToken() {
        return !writeTokens.isEmpty();
    }

    /** True when reads need a token. */
    public boolean readsNeedToken() {
        return !readTokens.isEmpty();
    }

    /** Like the generated form, but tokens are shown only by count: settings may be logged, tokens never. */
    @Override
    public String toString() {
        return "ServerSettings[port=" + port + ", bind=" + bind + ", writeTokens=" + writeTokens.size()
                + " redacted, readTokens=" + readTokens.size() + " redacted, maxBodyBytes=" + maxBodyBytes
                + ", maxLineBytes=" + maxLineBytes + ", maxSamplesPerRequest=" + maxSamplesPerRequest
                + ", maxSessions=" + maxSessions + ", maxVehicleIdChars=" + maxVehicleIdChars
                + ", maxSamplesPerSecondPerVehicle=" + maxSamplesPerSecondPerVehicle + ", rateBurstS=" + rateBurstS
                + ", corsOrigins=" + corsOrigins + ", sseKeepAliveS=" + sseKeepAliveS + ", idleTimeoutS=" + idleTimeoutS
                + ", minBodyBytesPerS=" + minBodyBytesPerS + ", drainTimeoutS=" + drainTimeoutS
                + ", maxConcurrentUploads=" + maxConcurrentUploads + ", maxStreams=" + maxStreams + "]";
    }

    /**
     * A token is sent in an {@code Authorization} header, so it must be a non-empty RFC 6750 b64token
     * (letters, digits and {@code - . _ ~ + /}, then optional {@code =}); anything else could never match.
     * The message never repeats the token.
     */
    private static List<String> tokens(String key, List<String> given) {
        List<String> copy = List.copyOf(given == null ? List.of() : given);
        for (int i = 0; i < copy.size(); i++) {
            if (!copy.get(i).matches("[A-Za-z0-9\\-._~+/]+=*")) {
                throw new SettingsException(key, "item " + (i + 1)
                        + " must be a bearer token of letters, digits and - . _ ~ + / (then optional =)"
                        + " with no spaces; its value is not shown");
            }
        }
        return copy;
    }
}
