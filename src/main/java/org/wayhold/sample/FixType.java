package org.wayhold.sample;

import java.util.Locale;

/** The kind of GNSS solution a fix reports, with its wire name. */
public enum FixType {
    NONE("none"),
    TWO_D("2d"),
    THREE_D("3d"),
    DGNSS("dgnss"),
    RTK_FLOAT("rtk_float"),
    RTK_FIXED("rtk_fixed");

    private final String wireName;

    FixType(String wireName) {
        this.wireName = wireName;
    }

    /** The name used in NDJSON and configuration, for example {@code "rtk_fixed"}. */
    public String wireName() {
        return wireName;
    }

    /**
     * Parses a wire name.
     *
     * @throws IllegalArgumentException naming the allowed values when {@code name} is unknown
     */
    public static FixType fromWireName(String name) {
        for (FixType f : values()) {
            if (f.wireName.equals(name)) {
                return f;
            }
        }
        throw new IllegalArgumentException("fix: unknown fix type '" + name
                + "', expected one of none, 2d, 3d, dgnss, rtk_float, rtk_fixed");
    }

    @Override
    public String toString() {
        return wireName.toLowerCase(Locale.ROOT);
    }
}
