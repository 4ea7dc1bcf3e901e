package org.wayhold.http;

import io.micrometer.core.instrument.Counter;
import io.micrometer.core.instrument.FunctionCounter;
import io.micrometer.core.instrument.Gauge;
import io.micrometer.core.instrument.Timer;
import io.micrometer.core.instrument.binder.jvm.ClassLoaderMetrics;
import io.micrometer.core.instrument.binder.jvm.JvmGcMetrics;
import io.micrometer.core.instrument.binder.jvm.JvmInfoMetrics;
import io.micrometer.core.instrument.binder.jvm.JvmMemoryMetrics;
import io.micrometer.core.instrument.binder.jvm.JvmThreadMetrics;
import io.micrometer.core.instrument.binder.system.FileDescriptorMetrics;
import io.micrometer.core.instrument.binder.system.ProcessorMetrics;
import io.micrometer.core.instrument.binder.system.UptimeMetrics;
import io.micrometer.prometheusmetrics.PrometheusConfig;
import io.micrometer.prometheusmetrics.PrometheusMeterRegistry;
import java.util.List;
import java.util.Optional;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicLongArray;
import org.wayhold.BuildInfo;
import org.wayhold.filter.FilterCounter;
import org.wayhold.filter.FilterCounts;
import org.wayhold.journal.SessionJournal;
import org.wayhold.pose.NavState;
import org.wayhold.pose.Pose;
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
 *   <li>{@code wayhold_sessions}: vehicle sessions held; {@code wayhold_sessions_quarantined}: those
 *       held apart because their state could not be trusted;</li>
 *   <li>{@code wayhold_outages_active}: sessions whose latest pose is in a GNSS outage;</li>
 *   <li>{@code wayhold_vehicles{state, stale}}: vehicles by the navigation state of their latest pose
 *       ({@code none} before the first pose) and by whether they have stopped sending ({@code stale}
 *       {@code true} or {@code false}, {@code outage.stale_after_s}); every combination is exposed, so
 *       a count that falls to 0 shows as 0, and the values of one scrape are counted together;</li>
 *   <li>{@code wayhold_filter_events_total{event}}: what the vehicles' filters counted since this process
 *       started, summed over the vehicles, one {@code event} per {@link FilterCounter} under its wire name
 *       ({@code fixes_used}, {@code fixes_gated}, {@code fixes_pending}, {@code fixes_dropped},
 *       {@code fixes_unusable}, {@code velocity_gated}, {@code covariance_repairs}, {@code updates_refused},
 *       {@code inputs_refused}, {@code covariance_widenings}, {@code resets}); see
 *       {@link #countFilterEvents()} for how deleted vehicles, restarts and re-filtering are kept out of
 *       its way down;</li>
 *   <li>{@code wayhold_sse_clients}: open pose streams;</li>
 *   <li>{@code wayhold_http_request_seconds{method, route, status}}: request latency, with a histogram;</li>
 *   <li>{@code wayhold_build_info{version, commit}}: always 1, its labels say what runs;</li>
 *   <li>with a journal ({@code serve --data DIR}): {@code wayhold_journal_records_written_total} and
 *       {@code wayhold_journal_written_bytes_total} (batches and deletions written by this process),
 *       {@code wayhold_journal_snapshots_total}, {@code wayhold_journal_snapshot_failures_total},
 *       {@code wayhold_journal_last_snapshot_age_seconds} (NaN before this process's first snapshot),
 *       {@code wayhold_journal_write_failed} (1 while writes fail and batches are refused) and
 *       {@code wayhold_journal_recovery_lost_ranges} (ranges of records the last start could not
 *       restore);</li>
 *   <li>the JVM and the process, from Micrometer's binders: {@code jvm_memory_*}, {@code jvm_gc_*},
 *       {@code jvm_threads_*}, {@code jvm_classes_*}, {@code jvm_info}, {@code process_cpu_usage},
 *       {@code process_uptime_seconds}, {@code process_files_open_files}, {@code system_cpu_*}.</li>
 * </ul>
 */
final class ServiceMetrics implements AutoCloseable {

    /** Sample-type label of a line rejected before it became a sample. */
    static final String UNKNOWN_TYPE = "unknown";

    private final PrometheusMeterRegistry registry = new PrometheusMeterRegistry(PrometheusConfig.DEFAULT);
    private final ConcurrentHashMap<String, Counter> counters = new ConcurrentHashMap<>();
    private final ConcurrentHashMap<String, Timer> timers = new ConcurrentHashMap<>();

    /** State label of a vehicle without a pose yet. */
    static final String NO_STATE = "none";

    private final SessionRegistry sessions;
    /**
     * Vehicles per (state, stale) as of the last scrape, index {@code 2 * state + (stale ? 1 : 0)} with
     * {@link #NO_STATE} after the navigation states; refreshed once per scrape so that the gauges of one
     * scrape add up to the sessions counted.
     */
    private final java.util.concurrent.atomic.AtomicIntegerArray vehicles =
            new java.util.concurrent.atomic.AtomicIntegerArray(2 * (NavState.values().length + 1));

    /** Listens to the JVM's collector notifications: closed with the service. */
    private final JvmGcMetrics gc = new JvmGcMetrics();

    /**
     * The exported {@code wayhold_filter_events_total}, index {@link FilterCounter#ordinal()}: never
     * lower than at an earlier scrape (see {@link #countFilterEvents()}).
     */
    private final AtomicLongArray filterEvents = new AtomicLongArray(FilterCounter.values().length);
    /**
     * Final counts of the sessions dropped since this process started, index {@link FilterCounter#ordinal()};
     * read and added to under {@link #retiredLock}, together with the list of held sessions.
     */
    private final long[] retiredEvents = new long[FilterCounter.values().length];
    private final Object retiredLock = new Object();
    /** Counts the sessions held when this process's metrics began (restored from the journal) already had. */
    private final long[] restoredEvents;

    ServiceMetrics(SessionRegistry sessions, PoseStreams streams, Optional<SessionJournal> journal) {
        this.sessions = sessions;
        this.restoredEvents = sumOfFilterCounts(sessions.sessions());
        sessions.addRemovalListener(this::retire);
        for (FilterCounter c : FilterCounter.values()) {
            int index = c.ordinal();
            FunctionCounter.builder("wayhold.filter.events", filterEvents, a -> a.get(index))
                    .description("what the vehicles' filters counted since this process started, summed over"
                            + " the vehicles (deleted ones included), by event")
                    .tags("event", c.wireName()).register(registry);
        }
        int states = NavState.values().length;
        for (int i = 0; i <= states; i++) {
            String state = i < states ? NavState.values()[i].wireName() : NO_STATE;
            for (int stale = 0; stale < 2; stale++) {
                int index = 2 * i + stale;
                Gauge.builder("wayhold.vehicles", vehicles, v -> v.get(index))
                        .description("vehicles by the navigation state of their latest pose and by whether"
                                + " nothing has arrived from them for longer than outage.stale_after_s")
                        .tags("state", state, "stale", Boolean.toString(stale == 1)).register(registry);
            }
        }
        Gauge.builder("wayhold.sessions", sessions, SessionRegistry::size)
                .description("vehicle sessions held").register(registry);
        Gauge.builder("wayhold.sessions.quarantined", sessions,
                r -> r.sessions().stream().filter(s -> s.quarantineReason().isPresent()).count())
                .description("vehicle sessions quarantined (their requests are answered 503)").register(registry);
        Gauge.builder("wayhold.outages.active", sessions, ServiceMetrics::activeOutages)
                .description("sessions whose latest pose is in a GNSS outage").register(registry);
        Gauge.builder("wayhold.sse.clients", streams, PoseStreams::openCount)
                .description("open Server-Sent Events pose streams").register(registry);
        BuildInfo build = BuildInfo.current();
        Gauge.builder("wayhold.build.info", () -> 1)
                .description("the running build: version and git commit in the labels, value always 1")
                .tags("version", build.version(), "commit", build.commit() + (build.dirty() ? "-dirty" : ""))
                .register(registry);
        journal.ifPresent(this::journalMeters);
        new ClassLoaderMetrics().bindTo(registry);
        new JvmMemoryMetrics().bindTo(registry);
        gc.bindTo(registry);
        new JvmThreadMetrics().bindTo(registry);
        new JvmInfoMetrics().bindTo(registry);
        new ProcessorMetrics().bindTo(registry);
        new UptimeMetrics().bindTo(registry);
        new FileDescriptorMetrics().bindTo(registry);
    }

    private void journalMeters(SessionJournal j) {
        FunctionCounter.builder("wayhold.journal.records.written", j, SessionJournal::recordsWritten)
                .description("journal records (sample batches and deletions) written by this process")
                .register(registry);
        FunctionCounter.builder("wayhold.journal.written", j, SessionJournal::bytesWritten).baseUnit("bytes")
                .description("bytes of journal records written by this process").register(registry);
        FunctionCounter.builder("wayhold.journal.snapshots", j, x -> x.status().snapshotsWritten())
                .description("snapshots of all sessions written by this process").register(registry);
        FunctionCounter.builder("wayhold.journal.snapshot.failures", j, SessionJournal::snapshotFailures)
                .description("periodic snapshots that failed (each is retried at the next interval)")
                .register(registry);
        Gauge.builder("wayhold.journal.last.snapshot.age", j, x -> x.status().lastSnapshotAgeS()).baseUnit("seconds")
                .description("wall time since this process's last snapshot (NaN before the first)")
                .register(registry);
        Gauge.builder("wayhold.journal.write.failed", j, x -> x.status().writable() ? 0 : 1)
                .description("1 while journal writes fail and batches are refused (they resume by themselves once"
                        + " the journal can write)").register(registry);
        Gauge.builder("wayhold.journal.recovery.lost.ranges", j, x -> x.recovery().lost().size())
                .description("ranges of journal records the last start could not restore (0 when nothing was lost)")
                .register(registry);
    }

    /** Stops listening to the JVM's garbage collector. */
    @Override
    public void close() {
        gc.close();
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
        countVehicles();
        countFilterEvents();
        return registry.scrape();
    }

    /**
     * Refreshes {@code wayhold_filter_events_total} for this scrape: the held sessions' counts, plus the
     * final counts of the sessions dropped since this process started, less what the sessions held at
     * its start already had. So the family counts what happened in this process, as every other
     * {@code _total} here does: a restart starts it again from 0, which Prometheus takes as a counter
     * reset, while the restored vehicles keep their own counts in the vehicle list. Counting the
     * restored history again would look, after a restart that forgot deleted vehicles, like a reset
     * followed by the whole fleet's history happening at once.
     *
     * <p>Monotonic: a deleted vehicle's counts move into the retired total when its session is dropped
     * ({@link #retire}). The list of held sessions and the retired total are read under one lock, and the
     * removal listener runs after the session has left the list, so a vehicle is counted once, never
     * twice. Two things can still lower the sum: the instant between a session leaving the list and its
     * counts reaching the retired total, and a re-filtering after late samples, which recounts from a
     * checkpoint and may revise a decision (a fix taken before the odometry of its time arrived, gated
     * once it is in, is one fewer used fix). So each exported value is the largest sum seen so far: it
     * holds still until the events since pass it.
     *
     * <p>Each session's counts are copied under its own lock ({@link VehicleSession#stats()}), never
     * while holding the retired lock.
     */
    private void countFilterEvents() {
        List<VehicleSession> held;
        long[] total;
        synchronized (retiredLock) {
            held = sessions.sessions();
            total = retiredEvents.clone();
        }
        long[] current = sumOfFilterCounts(held);
        for (int i = 0; i < total.length; i++) {
            long sinceStart = total[i] + current[i] - restoredEvents[i];
            filterEvents.accumulateAndGet(i, sinceStart, Math::max);
        }
    }

    /** Keeps a dropped session's final counts in the retired total. */
    private void retire(VehicleSession session) {
        long[] last = sumOfFilterCounts(List.of(session));
        synchronized (retiredLock) {
            for (int i = 0; i < last.length; i++) {
                retiredEvents[i] += last[i];
            }
        }
    }

    /** The sessions' filter counts added up, index {@link FilterCounter#ordinal()}. */
    private static long[] sumOfFilterCounts(List<VehicleSession> held) {
        long[] sum = new long[FilterCounter.values().length];
        for (VehicleSession s : held) {
            FilterCounts counts = s.stats().filter();
            for (FilterCounter c : FilterCounter.values()) {
                sum[c.ordinal()] += counts.get(c);
            }
        }
        return sum;
    }

    /** Counts the vehicles by state and staleness for the gauges of this scrape. */
    private void countVehicles() {
        int states = NavState.values().length;
        int[] counts = new int[vehicles.length()];
        for (VehicleSession s : sessions.sessions()) {
            Optional<Pose> latest = s.latest();
            int state = latest.map(p -> p.state().ordinal()).orElse(states);
            counts[2 * state + (s.liveness().stale() ? 1 : 0)]++;
        }
        for (int i = 0; i < counts.length; i++) {
            vehicles.set(i, counts[i]);
        }
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
