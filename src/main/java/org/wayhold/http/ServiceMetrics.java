package org.wayhold.http;

import io.micrometer.core.instrument.Counter;
import io.micrometer.core.instrument.Gauge;
import io.micrometer.core.instrument.Timer;
import io.micrometer.core.instrument.binder.jvm.JvmMemoryMetrics;
import io.micrometer.prometheusmetrics.PrometheusConfig;
import io.micrometer.prometheusmetrics.PrometheusMeterRegistry;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.TimeUnit;
import org.wayhold.sample.RejectionReason;
import org.wayhold.sample.SampleType;
import org.wayhold.session.SessionRegistry;
import org.wayhold.session.VehicleSession;

/**
 * The service's metrics, exposed at {@code /metrics} in the Prometheus text format by Micrometer.
 *
 * <p>Meters (Prometheus names):
 * <ul>
 *   <li>{@code wayhold_samples_accepted_total{type}}: samples applied to a session, by sample type;</li>
 *   <li>{@code wayhold_samples_duplicate_total{type}}: exact duplicates, accepted but ignored;</li>
 *   <li>{@code wayhold_samples_rejected_total{type, reason}}: rejected lines; {@code reason} is the code
 *       of the {@link RejectionReason}: {@code malformed} (not a JSON object, bad syntax, line too long),
 *       {@code invalid} (a field is missing or out of range), {@code implausible} (a value beyond the
 *       physical bounds of the {@code ingest} settings) - for these three {@code type} is
 *       {@code unknown} because the line never became a sample - {@code late} or {@code ahead} (outside
 *       the session's time-ordering window), or {@code off_timeline} (far from the other times of a
 *       vehicle's first batch);</li>
 *   <li>{@code wayhold_sessions}: vehicle sessions held;</li>
 *   <li>{@code wayhold_outages_active}: sessions whose latest pose is in a GNSS outage;</li>
 *   <li>{@code wayhold_sse_clients}: open pose streams;</li>
 *   <li>{@code wayhold_http_request_seconds{method, route, status}}: request latency, with a histogram;</li>
 *   <li>{@code jvm_memory_used_bytes{area, id}} and the other JVM memory meters of Micrometer's
 *       {@code JvmMemoryMetrics}: heap and non-heap use by memory pool, to see what requests cost.</li>
 * </ul>
 */
final class ServiceMetrics {

    /** Sample-type label of a line rejected before it became a sample. */
    static final String UNKNOWN_TYPE = "unknown";

    private final PrometheusMeterRegistry registry = new PrometheusMeterRegistry(PrometheusConfig.DEFAULT);
    private final ConcurrentHashMap<String, Counter> counters = new ConcurrentHashMap<>();
    private final ConcurrentHashMap<String, Timer> timers = new ConcurrentHashMap<>();

    ServiceMetrics(SessionRegistry sessions, PoseStreams streams) {
        Gauge.builder("wayhold.sessions", sessions, SessionRegistry::size)
                .description("vehicle sessions held").register(registry);
        Gauge.builder("wayhold.outages.active", sessions, ServiceMetrics::activeOutages)
                .description("sessions whose latest pose is in a GNSS outage").register(registry);
        Gauge.builder("wayhold.sse.clients", streams, PoseStreams::openCount)
                .description("open Server-Sent Events pose streams").register(registry);
        new JvmMemoryMetrics().bindTo(registry);
    }

    private static double activeOutages(SessionRegistry sessions) {
        int n = 0;
        for (VehicleSession s : sessions.sessions()) {
            if (s.latest().map(p -> p.outage().active()).orElse(false)) {
                n++;
            }
        }
        return n;
    }

    void accepted(SampleType type, long n) {
        if (n > 0) {
            counter("wayhold.samples.accepted", "samples applied to a session", "type", type.metricLabel(), null,
                    null).increment(n);
        }
    }

    void duplicates(SampleType type, long n) {
        if (n > 0) {
            counter("wayhold.samples.duplicate", "exact duplicate samples, accepted and ignored", "type",
                    type.metricLabel(), null, null).increment(n);
        }
    }

    /**
     * Counts one rejected line.
     *
     * @param type the sample's type, or null for a line that never became a sample ({@link #UNKNOWN_TYPE})
     */
    void rejected(SampleType type, RejectionReason reason) {
        counter("wayhold.samples.rejected", "rejected sample lines", "type",
                type == null ? UNKNOWN_TYPE : type.metricLabel(), "reason", reason.code()).increment();
    }

    /** Records one request's latency; {@code route} is the route template, never the raw path. */
    void request(String method, String route, int status, double millis) {
        String key = method + ' ' + route + ' ' + status;
        Timer t = timers.computeIfAbsent(key, k -> Timer.builder("wayhold.http.request")
                .description("HTTP request latency")
                .tags("method", method, "route", route, "status", Integer.toString(status))
                .publishPercentileHistogram()
                .register(registry));
        t.record((long) (millis * 1e6), TimeUnit.NANOSECONDS);
    }

    /** The Prometheus text exposition (format 0.0.4). */
    String scrape() {
        return registry.scrape();
    }

    private Counter counter(String name, String description, String k1, String v1, String k2, String v2) {
        String key = name + '|' + v1 + '|' + v2;
        return counters.computeIfAbsent(key, k -> {
            Counter.Builder b = Counter.builder(name).description(description).tag(k1, v1);
            if (k2 != null) {
                b.tag(k2, v2);
            }
            return b.register(registry);
        });
    }
}
