package org.wayhold.tracks;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Set;
import org.wayhold.fusion.FusedDrive;

/** Writes a fused drive's track files into a directory: {@code NAME.csv}, {@code NAME.geojson}, {@code NAME.gpx}. */
public final class TrackFiles {

    private TrackFiles() {
    }

    /**
     * Writes the chosen formats.
     *
     * @param drive   the fused drive
     * @param dir     the directory (created when missing)
     * @param base    the files' name without extension
     * @param formats which formats
     * @return the files written, in the order csv, geojson, gpx
     */
    public static List<Path> write(FusedDrive drive, Path dir, String base, Set<TrackFormat> formats)
            throws IOException {
        Files.createDirectories(dir);
        List<Path> written = new ArrayList<>();
        for (TrackFormat f : TrackFormat.values()) {
            if (!formats.contains(f)) {
                continue;
            }
            Path file = dir.resolve(base + "." + f.extension());
            switch (f) {
                case CSV -> TrackCsv.write(drive, file);
                case GEOJSON -> TrackGeoJson.write(drive, file);
                case GPX -> TrackGpx.write(drive, file);
                default -> throw new IllegalStateException("unhandled format " + f);
            }
            written.add(file);
        }
        return written;
    }

    /**
     * The base name of a log's track files: its file name without {@code .gz}, {@code .ndjson} or
     * {@code .json}.
     */
    public static String baseName(Path log) {
        String name = log.getFileName().toString();
        for (String ext : new String[] {".gz", ".ndjson", ".jsonl", ".json"}) {
            if (name.endsWith(ext) && name.length() > ext.length()) {
                name = name.substring(0, name.length() - ext.length());
            }
        }
        return name;
    }
}
