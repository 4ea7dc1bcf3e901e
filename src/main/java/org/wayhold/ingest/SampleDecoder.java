package org.wayhold.ingest;

import com.fasterxml.jackson.core.JsonParser;
import com.fasterxml.jackson.core.JsonToken;
import com.fasterxml.jackson.core.io.NumberInput;
import java.io.IOException;
import java.util.Arrays;
import java.util.List;
import org.wayhold.sample.FixType;
import org.wayhold.sample.GnssFix;
import org.wayhold.sample.ReferencePoint;
import org.wayhold.sample.Sample;
import org.wayhold.sample.SampleType;
import org.wayhold.sample.WheelSpeed;
import org.wayhold.sample.YawRate;

/**
 * Turns one JSON object, read token by token, into a sample. No tree is built: each known field goes
 * straight from the token stream into a slot, and the record is made once the object has ended.
 *
 * <p>Known field names are checked for their JSON type wherever they appear, even on a line whose
 * {@code type} does not use them (every name has one meaning across all sample types); a field that a
 * type does not use is then ignored. A JSON {@code null} counts as "not given". Unknown names are
 * skipped unread, whatever their value, and tallied for {@link #unknownFields()}.
 *
 * <p>Most lines take a faster road, {@link #decodeFlat}: a flat object of known fields with plain
 * values is read straight from its bytes, without a JSON parser, and anything else is handed to the
 * token-by-token path, which gives every rejection its reason.
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

    private static final String TYPES = SampleType.listed();

    /** Longest piece of a bad string value quoted back in a message (characters). */
    private static final int QUOTE_LIMIT = 40;

    /** Wire names as ASCII bytes, indexed like {@link #NAMES}, for {@link #decodeFlat}. */
    private static final byte[][] NAME_BYTES = new byte[NAMES.length][];
    private static final SampleType[] TYPES_KNOWN = SampleType.values();
    /** Wire names of the sample types as ASCII bytes, indexed like {@link #TYPES_KNOWN}. */
    private static final byte[][] TYPE_BYTES = new byte[TYPES_KNOWN.length][];
    private static final FixType[] FIX_TYPES = FixType.values();
    private static final byte[][] FIX_BYTES = new byte[FIX_TYPES.length][];
    private static final byte[] NULL_BYTES = ascii("null");
    /** 2^53: every whole number up to it is an exact double. */
    private static final long MAX_EXACT_SIGNIFICAND = 1L << 53;
    /** 10^0 .. 10^22, every one an exact double (5^22 < 2^53). */
    private static final double[] POWERS_OF_TEN = {
        1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18,
        1e19, 1e20, 1e21, 1e22};
    /** Exponents are read up to about this size; anything near it is far outside a double's range. */
    private static final int EXPONENT_CAP = 100_000;
    /** Known fields by the first byte of their wire name (ASCII only). */
    private static final int[][] NAMES_BY_FIRST_BYTE = new int[128][];
    /** Whole numbers of up to this many digits fit a long exactly, as in Jackson's own reading. */
    private static final int LONG_DIGITS = 18;
    /** Longest number {@link #decodeFlat} converts itself (characters); longer ones take the careful path. */
    private static final int NUMBER_CHARS = 64;

    static {
        for (int i = 0; i < NAMES.length; i++) {
            NAME_BYTES[i] = ascii(NAMES[i]);
        }
        for (int c = 0; c < NAMES_BY_FIRST_BYTE.length; c++) {
            int first = c;
            NAMES_BY_FIRST_BYTE[c] = java.util.stream.IntStream.range(0, NAMES.length)
                    .filter(f -> NAMES[f].charAt(0) == first).toArray();
        }
        for (int i = 0; i < TYPES_KNOWN.length; i++) {
            TYPE_BYTES[i] = ascii(TYPES_KNOWN[i].wireName());
        }
        for (int i = 0; i < FIX_TYPES.length; i++) {
            FIX_BYTES[i] = ascii(FIX_TYPES[i].wireName());
        }
    }

    private final double[] numbers = new double[NAMES.length];
    private final char[] numberChars = new char[NUMBER_CHARS];
    private int seen;
    private String type;
    private String fix;
    private FixType fixType;
    private int sats;
    private String error;
    /** The type when {@link #decodeFlat} read it, else null. */
    private SampleType flatType;
    /** Lines so far that carried a field of no sample type, and the first such names. */
    private long unknownLines;
    private final java.util.LinkedHashSet<String> unknownNames = new java.util.LinkedHashSet<>();

    /**
     * Reads the object whose {@code START_OBJECT} is the parser's current token, up to and including its
     * {@code END_OBJECT}, and returns the sample it describes. The whole object is consumed even when it
     * is rejected, so a parser over a JSON array stays in step.
     *
     * @throws IllegalArgumentException when the object is not a valid sample; the message names the field
     * @throws IOException              when the text is not well-formed JSON
     */
    Sample decode(JsonParser p) throws IOException {
        reset();
        boolean unknown = false;
        while (p.nextToken() == JsonToken.FIELD_NAME) {
            int field = indexOf(p.currentName());
            if (field < 0) {
                unknown = true;
                if (unknownNames.size() < UnknownFields.NAMES_KEPT) {
                    unknownNames.add(p.currentName());
                }
            }
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
        if (unknown) {
            unknownLines++;
        }
        if (error != null) {
            throw new IllegalArgumentException(error);
        }
        return build();
    }

    /** The fields of no sample type seen by this decoder so far. */
    UnknownFields unknownFields() {
        return unknownLines == 0 ? UnknownFields.NONE : new UnknownFields(unknownLines, List.copyOf(unknownNames));
    }

    private void reset() {
        seen = 0;
        type = null;
        fix = null;
        fixType = null;
        flatType = null;
        sats = -1;
        error = null;
        Arrays.fill(numbers, Double.NaN);
    }

    /**
     * Decodes the common line straight from its bytes: one object, spaces or tabs at most between
     * tokens, every name one of the known fields written plainly (ASCII, no escapes) and given once,
     * every value {@code null}, a JSON number (for {@code sats} a whole one of up to 9 digits, no sign)
     * or, for {@code type} and {@code fix}, one of their known words. Anything else returns null: the
     * caller must then read the line with {@link #decode(JsonParser)}, the careful path that also gives
     * malformed lines their reason.
     *
     * <p>For a line it does decode, the outcome is exactly the careful path's: the same slots and the
     * same {@link #build()}, so the same sample or the same IllegalArgumentException (range checks and
     * missing fields are all that can fail here). Numbers are converted as Jackson converts them: whole
     * numbers through a long, the rest by {@link NumberInput#parseDouble(char[], int, int, boolean)} with
     * the fast parser that {@link NdjsonReader}'s factory enables (correctly rounded, like
     * {@link Double#parseDouble}). A number that overflows to infinity takes the careful path, which
     * names the field.
     *
     * @param b    the bytes (not modified)
     * @param from first byte of the line
     * @param to   end of the line (exclusive), without its line terminator
     * @return the sample, or null when the line needs the careful path
     * @throws IllegalArgumentException when the line is well formed but not a valid sample
     */
    Sample decodeFlat(byte[] b, int from, int to) {
        reset();
        int i = skipSpace(b, from, to);
        if (i >= to || b[i] != '{') {
            return null;
        }
        i = skipSpace(b, i + 1, to);
        if (i < to && b[i] == '}') {
            return skipSpace(b, i + 1, to) == to ? build() : null;
        }
        while (true) {
            if (i >= to || b[i] != '"') {
                return null;
            }
            int field = nameAt(b, i + 1, to);
            if (field < 0) {
                return null;
            }
            int nameEnd = i + 1 + NAME_BYTES[field].length;
            i = skipSpace(b, nameEnd + 1, to);
            if (i >= to || b[i] != ':') {
                return null;
            }
            i = skipSpace(b, i + 1, to);
            if (i >= to) {
                return null;
            }
            if (b[i] == 'n') {
                if (!startsWith(b, i, to, NULL_BYTES)) {
                    return null;
                }
                i += NULL_BYTES.length;
            } else {
                int bit = 1 << field;
                if ((seen & bit) != 0) {
                    return null;
                }
                seen |= bit;
                i = field == TYPE || field == FIX ? flatWord(b, i, to, field) : flatNumber(b, i, to, field);
                if (i < 0) {
                    return null;
                }
            }
            i = skipSpace(b, i, to);
            if (i >= to) {
                return null;
            }
            if (b[i] == '}') {
                return skipSpace(b, i + 1, to) == to ? build() : null;
            }
            if (b[i] != ',') {
                return null;
            }
            i = skipSpace(b, i + 1, to);
        }
    }

    /** Reads a known word for {@code type} or {@code fix} at b[i]; returns the index after it, or -1. */
    private int flatWord(byte[] b, int i, int to, int field) {
        if (b[i] != '"') {
            return -1;
        }
        int end = plainStringEnd(b, i + 1, to);
        if (end < 0) {
            return -1;
        }
        if (field == TYPE) {
            for (int k = 0; k < TYPE_BYTES.length; k++) {
                if (equalsAt(b, i + 1, end, TYPE_BYTES[k])) {
                    flatType = TYPES_KNOWN[k];
                    type = flatType.wireName();
                    return end + 1;
                }
            }
            return -1;
        }
        for (int k = 0; k < FIX_BYTES.length; k++) {
            if (equalsAt(b, i + 1, end, FIX_BYTES[k])) {
                fixType = FIX_TYPES[k];
                fix = fixType.wireName();
                return end + 1;
            }
        }
        return -1;
    }

    /**
     * Reads a JSON number (RFC 8259 section 6: optional minus, an integer part without leading zeros,
     * optional fraction, optional exponent) into its slot in one pass over its bytes, and returns the
     * index after it, or -1 when the careful path must read the line.
     *
     * <p>Whole numbers of up to 18 digits are converted through a long, as Jackson converts them. Other
     * numbers take Clinger's fast path when they can (W. D. Clinger, "How to read floating point numbers
     * accurately", PLDI 1990): when the decimal significand w fits in 53 bits and 10^|e| <= 10^22, both
     * are exact doubles, so w * 10^e or w / 10^-e is one correctly rounded operation, the same double as
     * {@link Double#parseDouble}. Most sensor values (up to 15 or 16 significant digits) qualify; the
     * rest go to Jackson's {@link NumberInput#parseDouble(char[], int, int, boolean)} with the fast
     * parser, also correctly rounded. A number that overflows to infinity takes the careful path, which
     * names the field.
     */
    private int flatNumber(byte[] b, int i, int to, int field) {
        int j = i;
        boolean negative = b[j] == '-';
        if (negative) {
            j++;
        }
        int intStart = j;
        if (j >= to) {
            return -1;
        }
        long w = 0;
        int significant = 0;
        boolean tooLong = false;
        byte c = b[j];
        if (c == '0') {
            j++;
        } else if (c >= '1' && c <= '9') {
            do {
                if (significant < LONG_DIGITS) {
                    w = w * 10 + (c - '0');
                    significant++;
                } else {
                    tooLong = true;
                }
                j++;
            } while (j < to && (c = b[j]) >= '0' && c <= '9');
        } else {
            return -1;
        }
        int intDigits = j - intStart;
        boolean whole = true;
        int scale = 0;
        if (j < to && b[j] == '.') {
            whole = false;
            int fracStart = ++j;
            while (j < to && (c = b[j]) >= '0' && c <= '9') {
                if (significant == 0 && c == '0') {
                    scale--;
                } else if (significant < LONG_DIGITS) {
                    w = w * 10 + (c - '0');
                    significant++;
                    scale--;
                } else {
                    tooLong = true;
                }
                j++;
            }
            if (j == fracStart) {
                return -1;
            }
        }
        if (j < to && (b[j] == 'e' || b[j] == 'E')) {
            whole = false;
            j++;
            boolean negativeExp = false;
            if (j < to && (b[j] == '+' || b[j] == '-')) {
                negativeExp = b[j] == '-';
                j++;
            }
            int expStart = j;
            int exp = 0;
            while (j < to && (c = b[j]) >= '0' && c <= '9') {
                if (exp < EXPONENT_CAP) {
                    exp = exp * 10 + (c - '0');
                }
                j++;
            }
            if (j == expStart) {
                return -1;
            }
            scale += negativeExp ? -exp : exp;
        }
        if (field == SATS) {
            // A count: no sign, no fraction, no exponent, and small enough for an int.
            if (negative || !whole || intDigits > 9) {
                return -1;
            }
            sats = (int) w;
            return j;
        }
        double v;
        if (whole) {
            if (tooLong) {
                return -1;
            }
            v = negative ? -w : w;
        } else if (!tooLong && w <= MAX_EXACT_SIGNIFICAND && scale >= -22 && scale <= 22) {
            double d = w;
            v = scale >= 0 ? d * POWERS_OF_TEN[scale] : d / POWERS_OF_TEN[-scale];
            if (negative) {
                v = -v;
            }
        } else {
            int length = j - i;
            if (length > NUMBER_CHARS) {
                return -1;
            }
            for (int k = 0; k < length; k++) {
                numberChars[k] = (char) b[i + k];
            }
            v = NumberInput.parseDouble(numberChars, 0, length, true);
            if (!Double.isFinite(v)) {
                return -1;
            }
        }
        numbers[field] = v;
        return j;
    }

    /** Index of the closing quote of a plain string starting at b[from], or -1 (escape, control, non-ASCII, open). */
    private static int plainStringEnd(byte[] b, int from, int to) {
        for (int j = from; j < to; j++) {
            byte c = b[j];
            if (c == '"') {
                return j;
            }
            if (c == '\\' || c < 0x20) {
                // Negative bytes are the non-ASCII ones: UTF-8 validation is the parser's job.
                return -1;
            }
        }
        return -1;
    }

    /**
     * The known field whose wire name starts at b[from] and is closed by a quote, or -1. The first byte
     * picks at most four candidates; each is compared byte for byte, closing quote included, so a name
     * with an escape or any other spelling is not matched.
     */
    private static int nameAt(byte[] b, int from, int to) {
        if (from >= to || b[from] < 0) {
            return -1;
        }
        for (int field : NAMES_BY_FIRST_BYTE[b[from]]) {
            byte[] name = NAME_BYTES[field];
            int end = from + name.length;
            if (end < to && b[end] == '"' && equalsAt(b, from, end, name)) {
                return field;
            }
        }
        return -1;
    }

    private static boolean equalsAt(byte[] b, int from, int to, byte[] word) {
        if (to - from != word.length) {
            return false;
        }
        for (int k = 0; k < word.length; k++) {
            if (b[from + k] != word[k]) {
                return false;
            }
        }
        return true;
    }

    private static boolean startsWith(byte[] b, int from, int to, byte[] word) {
        return to - from >= word.length && equalsAt(b, from, from + word.length, word);
    }

    private static int skipSpace(byte[] b, int i, int to) {
        while (i < to && (b[i] == ' ' || b[i] == '\t')) {
            i++;
        }
        return i;
    }

    private static byte[] ascii(String s) {
        return s.getBytes(java.nio.charset.StandardCharsets.US_ASCII);
    }

    private Sample build() {
        if (type == null) {
            throw new IllegalArgumentException("type: missing, every sample needs one of " + TYPES);
        }
        SampleType kind = flatType != null ? flatType : knownType(type);
        switch (kind) {
            case GNSS -> {
                require(T, LAT, LON);
                FixType f = fixType != null ? fixType : fix == null ? FixType.THREE_D : FixType.fromWireName(fix);
                return new GnssFix(numbers[T], numbers[LAT], numbers[LON], numbers[ALT], numbers[SIGMA_H],
                        numbers[SIGMA_V], f, sats, numbers[HDOP], numbers[SPEED], numbers[COURSE]);
            }
            case WHEEL_SPEED -> {
                require(T, SPEED);
                return new WheelSpeed(numbers[T], numbers[SPEED]);
            }
            case YAW_RATE -> {
                require(T, RATE);
                return new YawRate(numbers[T], numbers[RATE]);
            }
            case REFERENCE -> {
                require(T, LAT, LON);
                return new ReferencePoint(numbers[T], numbers[LAT], numbers[LON], numbers[ALT], numbers[HEADING]);
            }
            default -> throw new IllegalStateException("type: no decoding for " + kind);
        }
    }

    private static SampleType knownType(String name) {
        for (SampleType t : TYPES_KNOWN) {
            if (t.wireName().equals(name)) {
                return t;
            }
        }
        throw new IllegalArgumentException("type: unknown sample type " + quote(name) + ", expected one of " + TYPES);
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
