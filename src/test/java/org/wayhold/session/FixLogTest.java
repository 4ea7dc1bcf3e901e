package org.wayhold.session;

import org.wayhold.pipeline.FixRecord;
import static org.assertj.core.api.Assertions.assertThat;

import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.DataInputStream;
import java.io.DataOutputStream;
import java.io.IOException;
import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;
import org.wayhold.filter.GnssOutcome;

/** The bounded fix log held in columns; expected contents are the records added (exact hand cases). */
class FixLogTest {

    private static FixRecord fix(int i, SplittableRandom rnd) {
        GnssOutcome.Kind[] kinds = GnssOutcome.Kind.values();
        return new FixRecord(500.0 + 0.5 * i, rnd.nextDouble(-90, 90), rnd.nextDouble(-180, 180),
                rnd.nextDouble(-1e4, 1e4), rnd.nextDouble(-1e4, 1e4), rnd.nextDouble(0.1, 30),
                kinds[i % kinds.length], i % 3 == 0 ? Double.NaN : rnd.nextDouble(0, 50));
    }

    @Test
    void theNewestFixesSurviveTheWrapATruncationAndTheBinaryFormBitForBit() throws IOException {
        // Seeded: 200 fixes into 70 slots, past the columns' first size and across the wrap.
        SplittableRandom rnd = new SplittableRandom(3);
        FixLog log = new FixLog(70);
        List<FixRecord> added = new ArrayList<>();
        for (int i = 0; i < 200; i++) {
            added.add(fix(i, rnd));
            log.add(added.get(i));
        }
        assertThat(log.between(Double.NEGATIVE_INFINITY, Double.POSITIVE_INFINITY))
                .containsExactlyElementsOf(added.subList(130, 200));
        // Inclusive at both ends: t = 500 + 0.5 i, so [580, 581] holds i = 160, 161, 162.
        assertThat(log.between(580.0, 581.0)).containsExactlyElementsOf(added.subList(160, 163));

        log.truncateAfter(added.get(150).t());
        FixRecord next = fix(300, rnd);
        log.add(next);
        List<FixRecord> expected = new ArrayList<>(added.subList(130, 151));
        expected.add(next);
        assertThat(log.between(Double.NEGATIVE_INFINITY, Double.POSITIVE_INFINITY)).containsExactlyElementsOf(expected);

        ByteArrayOutputStream bytes = new ByteArrayOutputStream();
        log.writeTo(new DataOutputStream(bytes));
        FixLog back = new FixLog(70);
        back.readFrom(new DataInputStream(new ByteArrayInputStream(bytes.toByteArray())));
        assertThat(back.between(Double.NEGATIVE_INFINITY, Double.POSITIVE_INFINITY)).containsExactlyElementsOf(expected);
    }
}
