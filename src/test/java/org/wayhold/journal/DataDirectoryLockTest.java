package org.wayhold.journal;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.wayhold.settings.JournalSettings;
import org.wayhold.testing.JournalFixtures;

/**
 * One journal per data directory. Expected values: this process's own id (ProcessHandle) and the
 * directory's real path, which the refusal must name. The refusal by another process is checked with
 * the real command in {@code OneServicePerDataDirectoryTest}.
 */
class DataDirectoryLockTest {

    /**
     * Rule: a second journal on a directory that is in use is refused, naming the directory and the
     * process that holds it; once the first is closed the directory can be opened again.
     */
    @Test
    void aSecondJournalOnTheSameDirectoryIsRefusedNamingTheHolder(@TempDir Path dir) throws IOException {
        Journal first = Journal.open(dir, JournalSettings.defaults());
        try {
            assertThatThrownBy(() -> Journal.open(dir, JournalSettings.defaults()))
                    .isInstanceOf(IOException.class)
                    .hasMessageContaining(dir.toRealPath().toString())
                    .hasMessageContaining("pid " + ProcessHandle.current().pid());
            assertThat(Files.readString(dir.resolve("wayhold.lock"))).startsWith("pid " + ProcessHandle.current().pid());
        } finally {
            first.close();
        }
        Journal.open(dir, JournalSettings.defaults()).close();
    }

    /** Rule: the lock file is the journal's own: recovery neither reports nor removes it. */
    @Test
    void theLockFileIsNotAStrayFile(@TempDir Path dir) throws IOException {
        try (Journal j = Journal.open(dir, JournalSettings.defaults())) {
            assertThat(j.recover(JournalFixtures.KEEP_NOTHING).notes()).isEmpty();
        }
        assertThat(dir.resolve("wayhold.lock")).exists();
    }
}
