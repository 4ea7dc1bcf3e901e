package org.wayhold.journal;

import java.io.IOException;
import java.nio.channels.FileChannel;
import java.nio.file.AccessDeniedException;
import java.nio.file.OpenOption;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.util.Set;

/**
 * How the journal opens the files it writes and forces its directory: the operating system's file
 * system in service, and in tests a wrapper that fails writes or forces on demand (a full disk, a
 * failing device), so that those paths are exercised deterministically.
 */
public interface JournalFiles {

    /** Opens a segment, a snapshot's temporary file or the head file for writing. */
    FileChannel open(Path file, Set<? extends OpenOption> options) throws IOException;

    /**
     * Forces the directory's entries (names created, renamed or deleted) to the device. A new file is
     * durable only once the directory that names it is: fsync of the file alone does not write the
     * directory entry (POSIX fsync(2); Linux ext4 and XFS document the same).
     */
    void forceDirectory(Path dir) throws IOException;

    /** The operating system's file system. */
    JournalFiles SYSTEM = new JournalFiles() {
        @Override
        public FileChannel open(Path file, Set<? extends OpenOption> options) throws IOException {
            return FileChannel.open(file, options);
        }

        @Override
        public void forceDirectory(Path dir) throws IOException {
            FileChannel channel;
            try {
                // On Linux and other POSIX systems the JDK opens a directory read-only, and force() is
                // then fsync(2) of the directory.
                channel = FileChannel.open(dir, StandardOpenOption.READ);
            } catch (AccessDeniedException | UnsupportedOperationException e) {
                // Windows refuses to open a directory this way; NTFS journals its metadata itself.
                return;
            }
            try (channel) {
                channel.force(true);
            }
        }
    };
}
