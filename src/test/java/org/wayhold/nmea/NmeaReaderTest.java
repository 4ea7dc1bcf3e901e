package org.wayhold.nmea;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import java.io.IOException;
import java.io.StringReader;
import java.time.Instant;
import org.junit.jupiter.api.Test;
import org.wayhold.sample.FixType;
import org.wayhold.sample.GnssFix;

/**
 * The worked sentences are the GGA and RMC example pair widely reproduced in receiver documentation and
 * in D. DePriest's "NMEA data" notes (cited from memory); their fields follow the GGA and RMC sentence
 * definitions of NMEA 0183 v3.0, and their checksums the rule of the same standard (8-bit XOR of the
 * characters between {@code $} and {@code *}). Decoded values are exact hand cases: ddmm.mmm is
 * dd + mm.mmm / 60 degrees, and a knot is 1852/3600 m/s (international nautical mile).
 */
class NmeaReaderTest {

    private static final String GGA = "$GPGGA,123519,4807.038,N,01131.000,E,1,08,0.9,545.4,M,46.9,M,,*47";
    private static final String RMC = "$GPRMC,123519,A,4807.038,N,01131.000,E,022.4,084.4,230394,003.1,W*6A";

    private static NmeaResult read(String text) throws IOException {
        return NmeaReader.read(new StringReader(text));
    }

    /** A sentence with its checksum computed here, for the cases the worked examples do not cover. */
    private static String sentence(String body) {
        return "$" + body + "*" + String.format("%02X", NmeaReader.checksum(body));
    }

    @Test
    void checksumsOfTheWorkedSentences() {
        assertThat(NmeaReader.checksum(GGA.substring(1, GGA.indexOf('*')))).isEqualTo(0x47);
        assertThat(NmeaReader.checksum(RMC.substring(1, RMC.indexOf('*')))).isEqualTo(0x6A);
    }

    @Test
    void theWorkedGgaAndRmcDecodeToOneFix() throws IOException {
        NmeaResult r = read(GGA + "\n" + RMC + "\n");
        assertThat(r.bad()).isEmpty();
        assertThat(r.fixes()).hasSize(1);
        GnssFix f = r.fixes().get(0);
        // Decoded values from the reference table: 48.1173000 N, 11.5166667 E, 8 satellites, HDOP 0.9,
        // 545.4 m + 46.9 m = 592.3 m ellipsoidal, 22.4 kn = 11.523556 m/s, course 84.4 deg.
        assertThat(f.latDeg()).isCloseTo(48.1173000, within(5e-8));
        assertThat(f.lonDeg()).isCloseTo(11.5166667, within(5e-8));
        assertThat(f.sats()).isEqualTo(8);
        assertThat(f.hdop()).isCloseTo(0.9, within(1e-12));
        assertThat(f.altM()).isCloseTo(592.3, within(1e-9));
        assertThat(f.speedMps()).isCloseTo(11.523556, within(5e-7));
        assertThat(f.courseDeg()).isCloseTo(84.4, within(1e-12));
        assertThat(f.fix()).isEqualTo(FixType.THREE_D);
        // Date 1994-03-23 with 12:35:19 UTC; the epoch seconds from java.time, independent of the reader.
        assertThat(f.t()).isEqualTo((double) Instant.parse("1994-03-23T12:35:19Z").getEpochSecond());
        assertThat(f.hasSigmaH()).isFalse();
    }

    @Test
    void badSentencesAreSkippedWithTheirLineNumbersAndReadingGoesOn() throws IOException {
        String wrongSum = GGA.replace("*47", "*48");
        String text = String.join("\n", RMC, wrongSum, "GPGGA,no dollar", "$GPGGA,123520,4807.038,N*",
                sentence("GPGGA,123521,4807.038,X,01131.000,E,1,08,0.9,545.4,M,46.9,M,,"),
                sentence("GPGGA,123522,4807.038,N,01131.000,E,1,08,0.9,545.4,M,46.9,M,,"),
                sentence("GPGSV,3,1,11,03,03,111,00"), "");
        NmeaResult r = read(text);
        assertThat(r.bad()).extracting(BadSentence::line).containsExactly(2L, 3L, 4L, 5L);
        assertThat(r.bad().get(0).reason()).isEqualTo("checksum: 48 given, 47 computed");
        assertThat(r.bad().get(3).reason()).contains("hemisphere 'X'");
        assertThat(r.otherTypes()).isEqualTo(1);
        assertThat(r.fixes()).hasSize(1);
        assertThat(r.fixes().get(0).t()).isEqualTo((double) Instant.parse("1994-03-23T12:35:22Z").getEpochSecond());
    }

    @Test
    void qualityMapsToFixTypesAndReceiverDeadReckoningIsSkipped() throws IOException {
        StringBuilder b = new StringBuilder(RMC).append('\n');
        int[] quality = {0, 1, 2, 4, 5, 6, 7};
        for (int i = 0; i < quality.length; i++) {
            b.append(sentence("GNGGA,1235" + (30 + i) + ",4807.038,S,01131.000,W," + quality[i]
                    + ",08,0.9,545.4,M,,M,,")).append('\n');
        }
        b.append(sentence("GNGGA,,,,,,0,00,,,M,,M,,")).append('\n');
        NmeaResult r = read(b.toString());
        assertThat(r.fixes()).extracting(GnssFix::fix).containsExactly(FixType.NONE, FixType.THREE_D,
                FixType.DGNSS, FixType.RTK_FIXED, FixType.RTK_FLOAT);
        assertThat(r.deadReckoning()).isEqualTo(1);
        assertThat(r.otherQuality()).isEqualTo(1);
        assertThat(r.noSolution()).isEqualTo(1);
        // South and west are negative; no geoid separation means no ellipsoidal height.
        assertThat(r.fixes().get(1).latDeg()).isCloseTo(-48.1173, within(5e-8));
        assertThat(r.fixes().get(1).lonDeg()).isCloseTo(-11.5166667, within(5e-8));
        assertThat(r.fixes().get(1).hasAlt()).isFalse();
    }

    @Test
    void fixesBeforeTheFirstDateAreHeldAndMidnightIsCrossedBothWays() throws IOException {
        String text = String.join("\n",
                sentence("GPGGA,235958.5,4807.038,N,01131.000,E,1,08,0.9,545.4,M,46.9,M,,"),
                sentence("GPGGA,000000.5,4807.038,N,01131.000,E,1,08,0.9,545.4,M,46.9,M,,"),
                sentence("GPRMC,000001.5,A,4807.038,N,01131.000,E,0.0,0.0,010125,,"),
                sentence("GPGGA,000001.5,4807.038,N,01131.000,E,1,08,0.9,545.4,M,46.9,M,,"),
                sentence("GPGGA,235959.0,4807.038,N,01131.000,E,1,08,0.9,545.4,M,46.9,M,,"),
                sentence("GPGGA,000000.0,4807.038,N,01131.000,E,1,08,0.9,545.4,M,46.9,M,,"));
        NmeaResult r = read(text);
        double jan1 = Instant.parse("2025-01-01T00:00:00Z").getEpochSecond();
        assertThat(r.fixes()).extracting(GnssFix::t).containsExactly(jan1 - 1.5, jan1 + 0.5, jan1 + 1.5,
                jan1 + 86_399.0, jan1 + 86_400.0);
        assertThat(r.undated()).isZero();
    }

    @Test
    void fixesWithoutAnyDateAreCountedNotGuessed() throws IOException {
        NmeaResult r = read(GGA);
        assertThat(r.fixes()).isEmpty();
        assertThat(r.undated()).isEqualTo(1);
    }
}
