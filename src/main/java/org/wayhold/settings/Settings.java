package org.wayhold.settings;

import java.util.Map;

/**
 * Everything {@code config/wayhold.yaml} configures.
 *
 * @param vehicles profiles by name; the profile named {@code default} serves vehicles without their own
 * @param journal  how the journal of accepted samples writes and keeps its files
 * @param ingest   plausibility bounds of samples and the per-request costs of ingest
 * @param worker   topics and limits of the fleet mode on Kafka
 */
public record Settings(ServerSettings server, FilterSettings filter, GatingSettings gating,
                       OutageSettings outage, OrderingSettings ordering, HistorySettings history,
                       Map<String, VehicleProfile> vehicles, JournalSettings journal, IngestSettings ingest,
                       WorkerSettings worker) {

    public static final String DEFAULT_PROFILE = "default";

    public Settings {
        java.util.Objects.requireNonNull(server, "server");
        java.util.Objects.requireNonNull(filter, "filter");
        java.util.Objects.requireNonNull(gating, "gating");
        java.util.Objects.requireNonNull(outage, "outage");
        java.util.Objects.requireNonNull(ordering, "ordering");
        java.util.Objects.requireNonNull(history, "history");
        java.util.Objects.requireNonNull(journal, "journal");
        java.util.Objects.requireNonNull(ingest, "ingest");
        java.util.Objects.requireNonNull(worker, "worker");
        java.util.HashMap<String, VehicleProfile> v = new java.util.HashMap<>();
        v.put(DEFAULT_PROFILE, VehicleProfile.defaults());
        if (vehicles != null) {
            v.putAll(vehicles);
        }
        vehicles = Map.copyOf(v);
    }

    /** Settings with the default worker section: for uses that never run the fleet mode. */
    public Settings(ServerSettings server, FilterSettings filter, GatingSettings gating, OutageSettings outage,
                    OrderingSettings ordering, HistorySettings history, Map<String, VehicleProfile> vehicles,
                    JournalSettings journal, IngestSettings ingest) {
        this(server, filter, gating, outage, ordering, history, vehicles, journal, ingest, WorkerSettings.defaults());
    }

    /** Settings with the default journal: for uses that never write one (tests, offline scoring). */
    public Settings(ServerSettings server, FilterSettings filter, GatingSettings gating, OutageSettings outage,
                    OrderingSettings ordering, HistorySettings history, Map<String, VehicleProfile> vehicles) {
        this(server, filter, gating, outage, ordering, history, vehicles, JournalSettings.defaults(),
                IngestSettings.defaults());
    }

    /** Settings with the default ingest bounds. */
    public Settings(ServerSettings server, FilterSettings filter, GatingSettings gating, OutageSettings outage,
                    OrderingSettings ordering, HistorySettings history, Map<String, VehicleProfile> vehicles,
                    JournalSettings journal) {
        this(server, filter, gating, outage, ordering, history, vehicles, journal, IngestSettings.defaults());
    }

    /** The same settings with another server section. */
    public Settings withServer(ServerSettings newServer) {
        return new Settings(newServer, filter, gating, outage, ordering, history, vehicles, journal, ingest, worker);
    }

    /** The same settings with other ingest bounds. */
    public Settings withIngest(IngestSettings newIngest) {
        return new Settings(server, filter, gating, outage, ordering, history, vehicles, journal, newIngest, worker);
    }

    /** The same settings with another worker section. */
    public Settings withWorker(WorkerSettings newWorker) {
        return new Settings(server, filter, gating, outage, ordering, history, vehicles, journal, ingest, newWorker);
    }

    /** The profile for a vehicle id: its own when configured, else {@code default}. */
    public VehicleProfile profileFor(String vehicleId) {
        VehicleProfile p = vehicles.get(vehicleId);
        return p != null ? p : vehicles.get(DEFAULT_PROFILE);
    }

    public static Settings defaults() {
        return new Settings(ServerSettings.defaults(), FilterSettings.defaults(), GatingSettings.defaults(),
                OutageSettings.defaults(), OrderingSettings.defaults(), HistorySettings.defaults(), Map.of(),
                JournalSettings.defaults(), IngestSettings.defaults(), WorkerSettings.defaults());
    }
}
