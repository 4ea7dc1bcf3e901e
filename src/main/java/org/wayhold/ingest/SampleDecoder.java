package org.wayhold.ingest;

import com.fasterxml.jackson.core.JsonParser;
import com.fasterxml.jackson.core.JsonToken;
import java.io.IOException;
import java.util.Arrays;
import org.wayhold.sample.FixType;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.ReferencePoint;
import org.wayhold.sample.Sample;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;

/**
 * Turns one JSON object, read token by token, into a sample. No tree is built: each known field goes
 * straight from the token stream into a slot, and the record is made once the object has ended.
 *
 * <p>Known field names are checked for their JSON type wherever they appear, even on a line whose
 * {@code type} does not use them (every name has one meaning across all sample types); a field that a
 * type does not use is then ignored. A JSON {@code null} counts as "not given". Unknown names are
 * skipped unread, whatever their value.
 *
 * <p>One instance is reused for every line of a read; it is not thread-safe.
 */
final class SampleDecoder {

    private static final int T = 0;
    private static final int TYPE = 1;
    private static final int LAT = 2;
    private static final int LON = 3;
    private static final int ALT = 4;
    private static final int SIGMA_H = 5;
    private static final int SIGMA_V = 6;
    private static final int FIX = 7;
    private static final int SATS = 8;
    private static final int HDOP = 9;
    private static final int SPEED = 10;
    private static final int COURSE = 11;
    private static final int RATE = 12;
    private static final int HEADING = 13;

    /** Wire name of each field, indexed like the constants above. */
    private static final String[] NAMES = {
        "t", "type", "lat", "lon", "alt", "sigma_h", "sigma_v", "fix", "sats", "hdop", "speed", "course",
        "rate", "heading"};

    /** Unit phrase of each numeric field for messages ("" when unitless, null when not numeric). */
    private static final String[] UNITS = {
        " of seconds", null, " of degrees", " of degrees", " of metres", " of metres", " of metres", null, null,
        "", " of m/s", " of degrees", " of rad/s", " of degrees"};

    private static final String TYPES = "gnss, wheel_speed, yaw_rate, reference";

    /** Longest piece of a bad string value quoted back in a message (characters). */
    private static final int QUOTE_LIMIT = 40;

    private final double[] numbers = new double[NAMES.length];
    private int seen;
    private String type;
    private String fix;
    private int sats;
    private String error;

    /**
     * Reads the object whose {@code START_OBJECT} is the parser's current token, up to and including its
     * {@code END_OBJECT}, and returns the sample it describes. The whole object is consumed even when it
     * is rejected, so a parser over a JSON array stays in step.
     *
     * @throws IllegalArgumentException when the object is not a valid sample; the message names the field
     * @throws IOException              when the text is not well-formed JSON
     */
    Sample decode(JsonParser p) throws IOException {
        seen = 0;
        type = null;
        fix = null;
        sats = -1;
        error = null;
        Arrays.fill(numbers, Double.NaN);
        while (p.nextToken() == JsonToken.FIELD_NAME) {
            int field = indexOf(p.currentName());
            JsonToken value = p.nextToken();
            if (error != null || field < 0) {
                // After the first error, or for a field we do not know: consume the value unread.
                p.skipChildren();
                continue;
            }
            if (value == JsonToken.VALUE_NULL) {
                continue;
            }
            int bit = 1 << field;
            if ((seen & bit) != 0) {
                fail(p, NAMES[field] + ": given more than once");
                continue;
            }
            seen |= bit;
            switch (field) {
                case TYPE -> type = text(p, value, TYPE);
                case FIX -> fix = text(p, value, FIX);
                case SATS -> sats = count(p, value);
                default -> numbers[field] = number(p, value, field);
            }
        }
        if (error != null) {
            throw new IllegalArgumentException(error);
        }
        return build();
    }

    private Sample build() {
        if (type == null) {
            throw new IllegalArgumentException("type: missing, every sample needs one of " + TYPES);
        }
        switch (type) {
            case "gnss" -> {
                require(T, LAT, LON);
                FixType fixType = fix == null ? FixType.THREE_D : FixType.fromWireName(fix);
                return new GnssFix(numbers[T], numbers[LAT], numbers[LON], numbers[ALT], numbers[SIGMA_H],
                        numbers[SIGMA_V], fixType, sats, numbers[HDOP], numbers[SPEED], numbers[COURSE]);
            }
            case "wheel_speed" -> {
                require(T, SPEED);
                return new WheelSpeed(numbers[T], numbers[SPEED]);
            }
            case "yaw_rate" -> {
                require(T, RATE);
                return new YawRate(numbers[T], numbers[RATE]);
            }
            case "reference" -> {
                require(T, LAT, LON);
                return new ReferencePoint(numbers[T], numbers[LAT], numbers[LON], numbers[ALT], numbers[HEADING]);
            }
            default -> throw new IllegalArgumentException("type: unknown sample type " + quote(type)
                    + ", expected one of " + TYPES);
        }
    }

    private void require(int... fields) {
        for (int field : fields) {
            if ((seen & (1 << field)) == 0) {
                throw new IllegalArgumentException(NAMES[field] + ": missing, required for type " + type);
            }
        }
    }

    private static int indexOf(String name) {
        // Jackson interns field names, so the switch's hash lookup is cheap.
        return switch (name) {
            case "t" -> T;
            case "type" -> TYPE;
            case "lat" -> LAT;
            case "lon" -> LON;
            case "alt" -> ALT;
            case "sigma_h" -> SIGMA_H;
            case "sigma_v" -> SIGMA_V;
            case "fix" -> FIX;
            case "sats" -> SATS;
            case "hdop" -> HDOP;
            case "speed" -> SPEED;
            case "course" -> COURSE;
            case "rate" -> RATE;
            case "heading" -> HEADING;
            default -> -1;
        };
    }

    private double number(JsonParser p, JsonToken value, int field) throws IOException {
        if (value != JsonToken.VALUE_NUMBER_FLOAT && value != JsonToken.VALUE_NUMBER_INT) {
            fail(p, NAMES[field] + ": must be a number" + UNITS[field] + ", was " + describe(p, value));
            return Double.NaN;
        }
        double v = p.getDoubleValue();
        // The parser admits NaN and Infinity so that we can name the field here; inside a record NaN
        // means "not given", so a NaN on the wire must never get that far. 1e999 also lands here.
        if (!Double.isFinite(v)) {
            fail(p, NAMES[field] + ": must be a finite number" + UNITS[field] + ", was " + p.getText());
        }
        return v;
    }

    private int count(JsonParser p, JsonToken value) throws IOException {
        if (value != JsonToken.VALUE_NUMBER_INT || p.getNumberType() != JsonParser.NumberType.INT
                || p.getIntValue() < 0) {
            fail(p, "sats: must be a whole number of satellites >= 0, was " + describe(p, value));
            return -1;
        }
        return p.getIntValue();
    }

    private String text(JsonParser p, JsonToken value, int field) throws IOException {
        if (value != JsonToken.VALUE_STRING) {
            fail(p, NAMES[field] + ": must be a string, was " + describe(p, value));
            return null;
        }
        return p.getText();
    }

    private void fail(JsonParser p, String message) throws IOException {
        error = message;
        p.skipChildren();
    }

    private static String describe(JsonParser p, JsonToken value) throws IOException {
        return switch (value) {
            case START_OBJECT -> "an object";
            case START_ARRAY -> "an array";
            case VALUE_STRING -> quote(p.getText());
            default -> p.getText();
        };
    }

    private static String quote(String s) {
        return s.length() <= QUOTE_LIMIT ? "'" + s + "'" : "'" + s.substring(0, QUOTE_LIMIT) + "...'";
    }

    /** How a top-level value that is not an object is described in a rejection. */
    static String notAnObject(JsonToken first) {
        String found = switch (first) {
            case START_ARRAY -> "an array";
            case VALUE_STRING -> "a string";
            case VALUE_NUMBER_INT, VALUE_NUMBER_FLOAT -> "a number";
            case VALUE_TRUE, VALUE_FALSE -> "a boolean";
            case VALUE_NULL -> "null";
            default -> first.toString();
        };
        return "not a JSON object: found " + found;
    }
}
