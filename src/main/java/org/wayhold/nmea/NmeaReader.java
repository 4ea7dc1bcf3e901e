package org.wayhold.nmea;

import java.io.BufferedInputStream;
import java.io.BufferedReader;
import java.io.IOException;
import java.io.InputStream;
import java.io.InputStreamReader;
import java.io.Reader;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.List;
import java.util.regex.Pattern;
import java.util.zip.GZIPInputStream;
import org.wayhold.sample.FixType;
import org.wayhold.sample.GnssFix;

/**
 * Reads GNSS fixes from NMEA 0183 sentences: GGA for position, fix quality, satellites, HDOP and height;
 * RMC for the date, speed and course.
 *
 * <p>Every sentence's checksum is verified: the 8-bit XOR of all characters between {@code $} (or
 * {@code !}) and {@code *}, written as two hex digits after the {@code *} (NMEA 0183 v3.0, as quoted in
 * receiver manuals). A sentence without one, with a wrong one, or with a field that cannot be read is
 * skipped and reported with its line number; reading goes on. Any talker (GP, GN, GL, ...) is accepted.
 *
 * <p>Sentences with the same UTC time of day form one epoch; an epoch with a GGA gives one fix, with
 * the speed and course of an RMC of the same epoch when its status is {@code A}. GGA quality maps to
 * the fix type: 0 to {@code none} (only when a position is given; without one the epoch is counted
 * and skipped), 1 to {@code 3d}, 2 to {@code dgnss}, 4 to {@code rtk_fixed}, 5 to {@code rtk_float};
 * 6 (estimated by the receiver's own dead reckoning) is skipped, so that scoring never takes a
 * receiver's guess for a fix; 3, 7 and 8 (PPS, manual input, simulator) are skipped too.
 *
 * <p>Dates: GGA has only the time of day. An epoch takes the date of the last RMC before it, plus one
 * day if its time of day is earlier than that RMC's (midnight passed). Epochs before the first RMC are
 * held until one arrives and then take its date, minus one day if their time of day is later than the
 * RMC's (they were before midnight); if none ever arrives they are dropped and counted. RMC's two-digit
 * year is read as 1980-2079 (a common convention; the standard does not say).
 *
 * <p>The height is the GGA altitude above mean sea level plus the geoid separation, i.e. above the
 * WGS-84 ellipsoid; when either is missing the fix has no height. NMEA gives no accuracy in metres, so
 * {@code sigma_h} is left unset and the filter derives one from HDOP.
 */
public final class NmeaReader {

    /** Metres per second in one knot: 1852 m per hour (international nautical mile). */
    public static final double MPS_PER_KNOT = 1852.0 / 3600.0;

    private static final double SECONDS_PER_DAY = 86_400.0;

    private static final Pattern DECIMAL = Pattern.compile("[+-]?(\\d+\\.?\\d*|\\.\\d+)");

    private final List<GnssFix> fixes = new ArrayList<>();
    private final List<BadSentence> bad = new ArrayList<>();
    private int noSolution;
    private int deadReckoning;
    private int otherQuality;
    private int otherTypes;

    private Epoch current;
    private final List<Epoch> held = new ArrayList<>();
    private long lastDateEpochDay = Long.MIN_VALUE;
    private double lastDatedTod = Double.NaN;

    private NmeaReader() {
    }

    /** Reads a file; a name ending in {@code .gz} or gzip magic bytes means gzip-compressed. */
    public static NmeaResult readFile(Path file) throws IOException {
        try (InputStream raw = new BufferedInputStream(Files.newInputStream(file))) {
            raw.mark(2);
            int b1 = raw.read();
            int b2 = raw.read();
            raw.reset();
            boolean gzip = file.toString().endsWith(".gz") || (b1 == 0x1f && b2 == 0x8b);
            InputStream in = gzip ? new GZIPInputStream(raw, 64 * 1024) : raw;
            return read(new InputStreamReader(in, StandardCharsets.US_ASCII));
        }
    }

    /** Reads NMEA text to its end. Does not close {@code in}. */
    public static NmeaResult read(Reader in) throws IOException {
        NmeaReader r = new NmeaReader();
        BufferedReader br = in instanceof BufferedReader b ? b : new BufferedReader(in);
        String line;
        long n = 0;
        while ((line = br.readLine()) != null) {
            n++;
            r.line(n, line.strip());
        }
        r.flush();
        return new NmeaResult(r.fixes, r.bad, r.noSolution, r.deadReckoning, r.otherQuality, r.otherTypes,
                r.held.size());
    }

    /**
     * The NMEA checksum of a sentence body (the characters between {@code $} and {@code *}).
     *
     * @return the XOR of the characters (0..255)
     */
    public static int checksum(CharSequence body) {
        int c = 0;
        for (int i = 0; i < body.length(); i++) {
            c ^= body.charAt(i);
        }
        return c & 0xFF;
    }

    /** One sentence group: everything with the same time of day. */
    private static final class Epoch {
        final double tod;
        Gga gga;
        Rmc rmc;

        Epoch(double tod) {
            this.tod = tod;
        }
    }

    private record Gga(double latDeg, double lonDeg, FixType fix, int sats, double hdop, double altM) {
    }

    private record Rmc(long epochDay, double speedMps, double courseDeg) {
    }

    /** Thrown inside the parser for a bad field; turned into a {@link BadSentence}. */
    private static final class FieldException extends Exception {
        FieldException(String message) {
            super(message, null, false, false);
        }
    }

    private void line(long n, String s) {
        if (s.isEmpty()) {
            return;
        }
        if (s.charAt(0) != '$' && s.charAt(0) != '!') {
            bad.add(new BadSentence(n, "start: a sentence starts with $ or !, this one with '"
                    + abbreviate(s) + "'"));
            return;
        }
        int star = s.lastIndexOf('*');
        if (star < 0) {
            bad.add(new BadSentence(n, "checksum: missing (no *)"));
            return;
        }
        String given = s.substring(star + 1);
        String body = s.substring(1, star);
        int expected = checksum(body);
        if (given.length() != 2 || Character.digit(given.charAt(0), 16) < 0 || Character.digit(given.charAt(1), 16) < 0) {
            bad.add(new BadSentence(n, "checksum: '" + given + "' is not two hex digits"));
            return;
        }
        int g = Integer.parseInt(given, 16);
        if (g != expected) {
            bad.add(new BadSentence(n, String.format("checksum: %02X given, %02X computed", g, expected)));
            return;
        }
        String[] f = body.split(",", -1);
        String type = f[0].length() >= 3 ? f[0].substring(f[0].length() - 3) : f[0];
        try {
            if (type.equals("GGA") && f[0].length() == 5) {
                gga(f);
            } else if (type.equals("RMC") && f[0].length() == 5) {
                rmc(f);
            } else {
                otherTypes++;
            }
        } catch (FieldException e) {
            bad.add(new BadSentence(n, f[0] + " " + e.getMessage()));
        }
    }

    private void gga(String[] f) throws FieldException {
        if (f.length < 10) {
            throw new FieldException("fields: at least 10 expected, found " + f.length);
        }
        int quality = integer("quality", f[6]);
        boolean hasPosition = !f[2].isEmpty() && !f[4].isEmpty();
        if (quality == 0 && !hasPosition) {
            // Receivers without a solution often leave the time empty too: nothing to read.
            noSolution++;
            return;
        }
        double tod = timeOfDay(f[1]);
        FixType type;
        switch (quality) {
            case 0 -> type = FixType.NONE;
            case 1 -> type = FixType.THREE_D;
            case 2 -> type = FixType.DGNSS;
            case 4 -> type = FixType.RTK_FIXED;
            case 5 -> type = FixType.RTK_FLOAT;
            case 6 -> {
                deadReckoning++;
                return;
            }
            case 3, 7, 8 -> {
                otherQuality++;
                return;
            }
            default -> throw new FieldException("quality: " + quality + " is not a GGA fix quality (0-8)");
        }
        double lat = angle("latitude", f[2], f[3], 2, 90, 'N', 'S');
        double lon = angle("longitude", f[4], f[5], 3, 180, 'E', 'W');
        int sats = f[7].isEmpty() ? -1 : integer("satellites", f[7]);
        if (sats < -1) {
            throw new FieldException("satellites: " + sats + " is negative");
        }
        double hdop = f[8].isEmpty() ? Double.NaN : number("hdop", f[8]);
        if (hdop < 0) {
            throw new FieldException("hdop: " + hdop + " is negative");
        }
        double msl = f[9].isEmpty() ? Double.NaN : number("altitude", f[9]);
        double sep = f.length > 11 && !f[11].isEmpty() ? number("geoid separation", f[11]) : Double.NaN;
        epoch(tod).gga = new Gga(lat, lon, type, sats, hdop, msl + sep);
    }

    private void rmc(String[] f) throws FieldException {
        if (f.length < 10) {
            throw new FieldException("fields: at least 10 expected, found " + f.length);
        }
        double tod = timeOfDay(f[1]);
        long day = date(f[9]);
        boolean valid = "A".equals(f[2]);
        double speed = valid && !f[7].isEmpty() ? number("speed", f[7]) * MPS_PER_KNOT : Double.NaN;
        if (speed < 0) {
            throw new FieldException("speed: " + f[7] + " kn is negative");
        }
        double course = valid && !f[8].isEmpty() ? number("course", f[8]) : Double.NaN;
        if (course < 0 || course >= 360) {
            throw new FieldException("course: " + course + " deg is outside [0, 360)");
        }
        epoch(tod).rmc = new Rmc(day, speed, course);
    }

    /** The epoch of a time of day: the current one, or a new one after flushing it. */
    private Epoch epoch(double tod) {
        if (current == null || current.tod != tod) {
            flush();
            current = new Epoch(tod);
        }
        return current;
    }

    private void flush() {
        Epoch e = current;
        current = null;
        if (e == null) {
            return;
        }
        if (e.rmc != null) {
            if (lastDateEpochDay == Long.MIN_VALUE) {
                for (Epoch h : held) {
                    emit(h, e.rmc.epochDay() - (h.tod > e.tod ? 1 : 0));
                }
                held.clear();
            }
            lastDateEpochDay = e.rmc.epochDay();
            lastDatedTod = e.tod;
            emit(e, lastDateEpochDay);
        } else if (e.gga != null) {
            if (lastDateEpochDay == Long.MIN_VALUE) {
                held.add(e);
            } else {
                if (e.tod < lastDatedTod) {
                    lastDateEpochDay++;
                }
                lastDatedTod = e.tod;
                emit(e, lastDateEpochDay);
            }
        }
    }

    private void emit(Epoch e, long epochDay) {
        if (e.gga == null) {
            return;
        }
        Gga g = e.gga;
        double speed = e.rmc == null ? Double.NaN : e.rmc.speedMps();
        double course = e.rmc == null ? Double.NaN : e.rmc.courseDeg();
        fixes.add(new GnssFix(epochDay * SECONDS_PER_DAY + e.tod, g.latDeg(), g.lonDeg(), g.altM(), Double.NaN,
                Double.NaN, g.fix(), g.sats(), g.hdop(), speed, course));
    }

    /** hhmmss or hhmmss.sss to seconds of the day. */
    private static double timeOfDay(String s) throws FieldException {
        if (s.length() < 6) {
            throw new FieldException("time: '" + s + "' is not hhmmss[.ss]");
        }
        int h = digits("time", s, 0, 2);
        int m = digits("time", s, 2, 4);
        double sec = number("time", s.substring(4));
        if (h > 23 || m > 59 || !(sec >= 0 && sec < 61)) {
            throw new FieldException("time: '" + s + "' is not a UTC time of day");
        }
        return h * 3600.0 + m * 60.0 + sec;
    }

    /** ddmmyy to days since 1970-01-01; yy 80-99 is 19yy, 00-79 is 20yy. */
    private static long date(String s) throws FieldException {
        if (s.length() != 6) {
            throw new FieldException("date: '" + s + "' is not ddmmyy");
        }
        int d = digits("date", s, 0, 2);
        int mo = digits("date", s, 2, 4);
        int y = digits("date", s, 4, 6);
        try {
            return LocalDate.of(y >= 80 ? 1900 + y : 2000 + y, mo, d).toEpochDay();
        } catch (java.time.DateTimeException e) {
            throw new FieldException("date: '" + s + "' is not a calendar date");
        }
    }

    /** ddmm.mmmm (or dddmm.mmmm) with a hemisphere letter to signed degrees. */
    private static double angle(String name, String value, String hemi, int degDigits, double max, char pos,
                                char neg) throws FieldException {
        int dot = value.indexOf('.');
        int intLen = dot < 0 ? value.length() : dot;
        if (intLen != degDigits + 2) {
            throw new FieldException(name + ": '" + value + "' is not " + (degDigits == 2 ? "ddmm.mmmm" : "dddmm.mmmm"));
        }
        int deg = digits(name, value, 0, degDigits);
        double min = number(name, value.substring(degDigits));
        if (!(min >= 0 && min < 60)) {
            throw new FieldException(name + ": minutes " + min + " are outside [0, 60)");
        }
        double v = deg + min / 60.0;
        if (v > max) {
            throw new FieldException(name + ": " + v + " deg is beyond " + max);
        }
        if (hemi.length() == 1 && hemi.charAt(0) == pos) {
            return v;
        }
        if (hemi.length() == 1 && hemi.charAt(0) == neg) {
            return -v;
        }
        throw new FieldException(name + ": hemisphere '" + hemi + "' is not " + pos + " or " + neg);
    }

    private static int digits(String name, String s, int from, int to) throws FieldException {
        int v = 0;
        for (int i = from; i < to; i++) {
            char c = s.charAt(i);
            if (c < '0' || c > '9') {
                throw new FieldException(name + ": '" + s + "' has a non-digit where digits belong");
            }
            v = v * 10 + (c - '0');
        }
        return v;
    }

    private static int integer(String name, String s) throws FieldException {
        try {
            return Integer.parseInt(s);
        } catch (NumberFormatException e) {
            throw new FieldException(name + ": '" + s + "' is not a whole number");
        }
    }

    private static double number(String name, String s) throws FieldException {
        // Plain decimals only: Double.parseDouble alone would take "1e3", "NaN" or "1.0d".
        if (!DECIMAL.matcher(s).matches()) {
            throw new FieldException(name + ": '" + s + "' is not a decimal number");
        }
        return Double.parseDouble(s);
    }

    private static String abbreviate(String s) {
        return s.length() <= 20 ? s : s.substring(0, 20) + "...";
    }
}
