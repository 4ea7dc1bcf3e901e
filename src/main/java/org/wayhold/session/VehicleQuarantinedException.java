package org.wayhold.session;

/**
 * Thrown for a vehicle whose session is quarantined: its state could not be trusted (a batch that
 * failed to apply, a filter estimate that is not finite, a snapshot entry that could not be restored),
 * so it takes no batches and serves no poses until it is deleted. Other vehicles are not affected.
 */
public final class VehicleQuarantinedException extends RuntimeException {

    private final String vehicleId;
    private final String reason;

    /**
     * @param reason why the session was quarantined
     * @param cause  what was thrown while applying, or null
     */
    public VehicleQuarantinedException(String vehicleId, String reason, Throwable cause) {
        super("vehicle '" + vehicleId + "' is quarantined: " + reason, cause);
        this.vehicleId = vehicleId;
        this.reason = reason;
    }

    public String vehicleId() {
        return vehicleId;
    }

    public String reason() {
        return reason;
    }
}
