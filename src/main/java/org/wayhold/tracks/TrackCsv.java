package org.wayhold.tracks;

import java.io.IOException;
import java.io.Writer;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import org.wayhold.fusion.FusedDrive;
import org.wayhold.fusion.FusedPoint;

/**
 * Writes a fused drive as CSV (RFC 4180: CRLF line ends; no field needs quoting): one row per point,
 * the forward track's rows first, then the smoothed track's, told apart by the {@code estimate}
 * column. The unit of each column is in brackets in the header; a value that does not exist (no
 * position yet) is an empty cell. Reasons are the pose's reason codes joined with {@code ;}.
 */
public final class TrackCsv {

    /** The header; units in brackets. */
    public static final String HEADER = "estimate,t[s],time[utc],lat[deg],lon[deg],height[m],east[m],north[m],up[m],"
            + "heading[deg],heading_sigma[deg],speed[m/s],cov_ee[m^2],cov_en[m^2],cov_nn[m^2],"
            + "ellipse_semi_major[m],ellipse_semi_minor[m],ellipse_orientation[deg],radius95[m],state,reasons,"
            + "in_gap[bool]";

    private TrackCsv() {
    }

    public static void write(FusedDrive drive, Path file) throws IOException {
        try (Writer w = Files.newBufferedWriter(file, StandardCharsets.UTF_8)) {
            w.write(HEADER);
            w.write("\r\n");
            rows(w, "forward", drive.forward());
            rows(w, "smoothed", drive.smoothed());
        }
    }

    private static void rows(Writer w, String estimate, List<FusedPoint> points) throws IOException {
        StringBuilder b = new StringBuilder(256);
        for (FusedPoint p : points) {
            b.setLength(0);
            b.append(estimate).append(',').append(TrackValues.text(p.t(), 3)).append(',').append(TrackValues.utc(p.t()))
                    .append(',').append(TrackValues.text(p.latDeg(), TrackValues.DEG_DECIMALS))
                    .append(',').append(TrackValues.text(p.lonDeg(), TrackValues.DEG_DECIMALS))
                    .append(',').append(TrackValues.text(p.heightM(), TrackValues.M_DECIMALS))
                    .append(',').append(TrackValues.text(p.eastM(), TrackValues.M_DECIMALS))
                    .append(',').append(TrackValues.text(p.northM(), TrackValues.M_DECIMALS))
                    .append(',').append(TrackValues.text(p.upM(), TrackValues.M_DECIMALS))
                    .append(',').append(TrackValues.text(p.headingDeg(), 4))
                    .append(',').append(TrackValues.text(p.headingSigmaDeg(), 4))
                    .append(',').append(TrackValues.text(p.speedMps(), 4))
                    .append(',').append(TrackValues.text(p.covEastEastM2(), 6))
                    .append(',').append(TrackValues.text(p.covEastNorthM2(), 6))
                    .append(',').append(TrackValues.text(p.covNorthNorthM2(), 6))
                    .append(',').append(TrackValues.text(p.ellipse95().semiMajorM(), TrackValues.M_DECIMALS))
                    .append(',').append(TrackValues.text(p.ellipse95().semiMinorM(), TrackValues.M_DECIMALS))
                    .append(',').append(TrackValues.text(p.ellipse95().orientationDeg(), 4))
                    .append(',').append(TrackValues.text(p.radius95M(), TrackValues.M_DECIMALS))
                    .append(',').append(p.state().wireName())
                    .append(',').append(TrackValues.reasons(p, ";"))
                    .append(',').append(p.inGap())
                    .append("\r\n");
            w.write(b.toString());
        }
    }
}
