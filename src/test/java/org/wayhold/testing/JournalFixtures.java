package org.wayhold.testing;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.stream.Stream;
import org.wayhold.journal.Journal;
import org.wayhold.sample.Sample;

/** What tests that write a journal by hand need: a recovery that keeps nothing, and its segments in order. */
public final class JournalFixtures {

    /** A recovery target that restores, replays and deletes nothing: for a journal a test only writes. */
    public static final Journal.RecoveryTarget KEEP_NOTHING = new Journal.RecoveryTarget() {
        @Override
        public void restore(String vehicleId, byte[] snapshot) {
        }

        @Override
        public void replay(String vehicleId, List<Sample> batch, long seq) {
        }

        @Override
        public void delete(String vehicleId, long seq) {
        }
    };

    private JournalFixtures() {
    }

    /** The journal's segment files ({@code .wal}) in {@code dir}, in the order they were written. */
    public static List<Path> segments(Path dir) throws IOException {
        try (Stream<Path> files = Files.list(dir)) {
            return files.filter(p -> p.toString().endsWith(".wal")).sorted().toList();
        }
    }
}
