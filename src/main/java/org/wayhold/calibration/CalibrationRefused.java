package org.wayhold.calibration;

/** The drives cannot support a calibration; the message says what is missing. */
public final class CalibrationRefused extends RuntimeException {

    private static final long serialVersionUID = 1L;

    public CalibrationRefused(String message) {
        super(message);
    }
}
