package org.wayhold.nmea;

import java.util.List;
import org.wayhold.sample.GnssFix;

/**
 * What an NMEA 0183 input gave.
 *
 * @param fixes         the fixes, in input order
 * @param bad           sentences skipped as malformed (bad checksum, bad field), with their lines
 * @param noSolution    GGA sentences with quality 0 and no position (count): no fix, not an error
 * @param deadReckoning GGA sentences with quality 6, estimated by the receiver itself (count): skipped
 * @param otherQuality  GGA sentences with a quality that is not a GNSS solution (3, 7, 8) (count): skipped
 * @param otherTypes    well-formed sentences of types other than GGA and RMC (count): ignored
 * @param undated       GGA epochs dropped because no RMC date came before the input ended (count)
 */
public record NmeaResult(List<GnssFix> fixes, List<BadSentence> bad, int noSolution, int deadReckoning,
                         int otherQuality, int otherTypes, int undated) {

    public NmeaResult {
        fixes = List.copyOf(fixes);
        bad = List.copyOf(bad);
    }
}
