package org.wayhold.accuracy;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import org.wayhold.ingest.NdjsonReader;
import org.wayhold.ingest.ReadResult;
import org.wayhold.sample.Sample;
import org.wayhold.sample.YawRate;

/**
 * The real drives kept beside the checkout in {@code ../shared/real-drives/logs} (KITTI raw GNSS/INS,
 * converted; CC BY-NC-SA 3.0, so never copied into the repository). Tests that use them skip with a
 * message when the folder is absent.
 */
public final class RealDrives {

    /** Where the converted drives are, relative to the project root. */
    public static final Path LOGS = Path.of("..", "shared", "real-drives", "logs");

    /** Gyro bias the converter adds in its {@code degraded} variant (rad/s): 0.2 deg/s. */
    public static final double DEGRADED_GYRO_BIAS_RAD_PER_S = Math.toRadians(0.2);

    private RealDrives() {
    }

    /** True when the drives are there. */
    public static boolean present() {
        return Files.isDirectory(LOGS) && Files.exists(LOGS.resolve("kitti_10_03_drive_0027_real.ndjson.gz"));
    }

    /** The message a test skips with when they are not. */
    public static String absentMessage() {
        return "real drives not found at " + LOGS.toAbsolutePath().normalize()
                + " (KITTI-derived logs kept outside the repository); skipped";
    }

    /** A drive's samples in file order, e.g. {@code read("kitti_10_03_drive_0027_real")}. */
    public static List<Sample> read(String name) {
        return readPath(LOGS.resolve(name + ".ndjson.gz"));
    }

    /** A log's samples in file order. */
    public static List<Sample> readPath(Path path) {
        try {
            ReadResult r = NdjsonReader.readFileAll(path);
            if (!r.rejected().isEmpty()) {
                throw new IllegalStateException(path + ": " + r.rejected().get(0));
            }
            return r.samples();
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /**
     * The {@code degraded} variant with a gyro scale-factor error added, as the converter's
     * {@code --gyro-scale-error} makes it: rate = true rate * (1 + error) + bias. The degraded log holds
     * true rate + bias, so the true rate is recovered by subtracting the known bias.
     */
    public static List<Sample> withGyroScaleError(List<Sample> degraded, double scaleError) {
        List<Sample> out = new ArrayList<>(degraded.size());
        for (Sample s : degraded) {
            if (s instanceof YawRate y) {
                double trueRate = y.yawRateRadPerS() - DEGRADED_GYRO_BIAS_RAD_PER_S;
                out.add(new YawRate(y.t(), trueRate * (1.0 + scaleError) + DEGRADED_GYRO_BIAS_RAD_PER_S));
            } else {
                out.add(s);
            }
        }
        return out;
    }
}
