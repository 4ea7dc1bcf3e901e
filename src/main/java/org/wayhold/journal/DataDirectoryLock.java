package org.wayhold.journal;

import java.io.Closeable;
import java.io.IOException;
import java.nio.ByteBuffer;
import java.nio.channels.FileChannel;
import java.nio.channels.FileLock;
import java.nio.channels.OverlappingFileLockException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.time.Instant;
import java.util.Set;
import java.util.concurrent.ConcurrentHashMap;

/**
 * One service per data directory: an operating-system lock on {@value #FILE_NAME} in the directory,
 * held for as long as the journal is open, with the holder's process id written into the file.
 *
 * <p>Why: two services appending to the same segments interleave their records and number them
 * twice, and each one's snapshots and retention delete what the other needs, so samples the first one
 * acknowledged are gone after a restart. The lock is {@link FileChannel#tryLock()} (fcntl(2) on Linux),
 * released by the operating system when the process ends however it ends, so a SIGKILL never leaves
 * a stale lock behind; the file itself stays and is reused.
 */
final class DataDirectoryLock implements Closeable {

    static final String FILE_NAME = "wayhold.lock";

    /**
     * Directories locked by this JVM. POSIX record locks belong to the process, so a second lock from
     * the same JVM would not be refused by the system, and closing the second channel would drop the
     * first one's lock (FileChannel's documentation warns of this); this set refuses it first.
     */
    private static final Set<Path> HELD = ConcurrentHashMap.newKeySet();

    private final Path dir;
    private final FileChannel channel;
    private final FileLock lock;

    private DataDirectoryLock(Path dir, FileChannel channel, FileLock lock) {
        this.dir = dir;
        this.channel = channel;
        this.lock = lock;
    }

    /** Thrown when another process (or another journal in this JVM) holds the directory. */
    static final class InUseException extends IOException {
        InUseException(String message) {
            super(message);
        }
    }

    /**
     * Takes the lock of {@code dir} (which must exist) and writes this process's id into the lock file.
     *
     * @throws InUseException when another service holds it; the message names the directory and the
     *                        holder's process id
     */
    static DataDirectoryLock acquire(Path dir) throws IOException {
        Path real = dir.toRealPath();
        if (!HELD.add(real)) {
            throw inUse(real, "pid " + ProcessHandle.current().pid() + " (this process)");
        }
        FileChannel channel = null;
        try {
            channel = FileChannel.open(real.resolve(FILE_NAME), StandardOpenOption.CREATE, StandardOpenOption.READ,
                    StandardOpenOption.WRITE);
            FileLock lock;
            try {
                lock = channel.tryLock();
            } catch (OverlappingFileLockException e) {
                lock = null;
            }
            if (lock == null) {
                throw inUse(real, holder(channel));
            }
            String text = "pid " + ProcessHandle.current().pid() + "\nsince " + Instant.now() + "\n";
            channel.truncate(0);
            ByteBuffer b = ByteBuffer.wrap(text.getBytes(StandardCharsets.UTF_8));
            while (b.hasRemaining()) {
                channel.write(b, b.position());
            }
            channel.force(true);
            DataDirectoryLock held = new DataDirectoryLock(real, channel, lock);
            channel = null;
            return held;
        } finally {
            if (channel != null) {
                HELD.remove(real);
                channel.close();
            }
        }
    }

    private static InUseException inUse(Path dir, String holder) {
        return new InUseException("data directory " + dir + " is in use by another wayhold service (" + holder
                + ", lock file " + dir.resolve(FILE_NAME) + "); stop that service or choose another --data");
    }

    /** What the lock file says about its holder, for the message. */
    private static String holder(FileChannel channel) {
        try {
            ByteBuffer b = ByteBuffer.allocate(256);
            channel.read(b, 0);
            String text = new String(b.array(), 0, b.position(), StandardCharsets.UTF_8).strip();
            return text.isEmpty() ? "process unknown: the lock file is empty" : text.replace('\n', ',').replace(",", ", ");
        } catch (IOException e) {
            return "process unknown: the lock file cannot be read";
        }
    }

    /** Releases the lock; the file stays (the next start reuses it). */
    @Override
    public void close() throws IOException {
        try {
            lock.release();
        } finally {
            try {
                channel.close();
            } finally {
                HELD.remove(dir);
            }
        }
    }
}
