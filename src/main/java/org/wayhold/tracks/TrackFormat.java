package org.wayhold.tracks;

import java.util.Locale;

/** The track file formats {@code fuse} writes, with their file extensions. */
public enum TrackFormat {
    /** Comma-separated values, RFC 4180, units in the header. */
    CSV("csv"),
    /** GeoJSON, RFC 7946. */
    GEOJSON("geojson"),
    /** GPS Exchange Format 1.1. */
    GPX("gpx");

    private final String extension;

    TrackFormat(String extension) {
        this.extension = extension;
    }

    /** The file extension, without the dot; also the name on the command line. */
    public String extension() {
        return extension;
    }

    /**
     * The format of a name as given on the command line ({@code csv}, {@code geojson}, {@code gpx}).
     *
     * @throws IllegalArgumentException naming the value when it is none of them
     */
    public static TrackFormat of(String name) {
        for (TrackFormat f : values()) {
            if (f.extension.equals(name.trim().toLowerCase(Locale.ROOT))) {
                return f;
            }
        }
        throw new IllegalArgumentException("format: '" + name + "' is none of csv, geojson, gpx");
    }
}
