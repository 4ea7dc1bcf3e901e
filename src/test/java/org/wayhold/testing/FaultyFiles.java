package org.wayhold.testing;

import java.io.IOException;
import java.nio.ByteBuffer;
import java.nio.MappedByteBuffer;
import java.nio.channels.FileChannel;
import java.nio.channels.FileLock;
import java.nio.channels.ReadableByteChannel;
import java.nio.channels.WritableByteChannel;
import java.nio.file.OpenOption;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Set;
import java.util.function.Predicate;
import org.wayhold.journal.JournalFiles;

/**
 * The operating system's file system with faults switched on and off by a test: writes that fail as
 * on a full disk, forces that fail as on a failing device, or an OutOfMemoryError in the middle of a
 * write. Only files whose name the {@link #where} predicate accepts are affected; truncation always
 * works (it frees space). Also records what the journal did, in order, for tests of ordering.
 */
public final class FaultyFiles implements JournalFiles {

    /** What goes wrong. */
    public enum Fault {
        NONE,
        /** write() throws IOException("No space left on device"), as write(2) fails with ENOSPC. */
        DISK_FULL,
        /** write() works, force() throws IOException, as fsync(2) fails with EIO. */
        FORCE_FAILS,
        /** write() throws OutOfMemoryError. */
        OUT_OF_MEMORY
    }

    private volatile Fault fault = Fault.NONE;
    private volatile Predicate<String> where = name -> true;
    private final List<String> events = Collections.synchronizedList(new ArrayList<>());
    private volatile long bytesWritten;

    /** Switches a fault on for the files whose name {@code where} accepts (NONE switches it off). */
    public void fail(Fault f, Predicate<String> fileNames) {
        where = fileNames;
        fault = f;
    }

    public void heal() {
        fault = Fault.NONE;
    }

    /** "open NAME", "force-dir NAME-OF-DIR" in the order the journal did them. */
    public List<String> events() {
        synchronized (events) {
            return List.copyOf(events);
        }
    }

    /** Bytes written through channels opened here, whatever the file. */
    public long bytesWritten() {
        return bytesWritten;
    }

    @Override
    public FileChannel open(Path file, Set<? extends OpenOption> options) throws IOException {
        events.add("open " + file.getFileName());
        return new Channel(FileChannel.open(file, options), file.getFileName().toString());
    }

    @Override
    public void forceDirectory(Path dir) throws IOException {
        events.add("force-dir " + dir.getFileName());
        JournalFiles.SYSTEM.forceDirectory(dir);
    }

    private final class Channel extends FileChannel {
        private final FileChannel d;
        private final String name;

        Channel(FileChannel delegate, String name) {
            this.d = delegate;
            this.name = name;
        }

        private void beforeWrite() throws IOException {
            Fault f = fault;
            if (f == Fault.NONE || !where.test(name)) {
                return;
            }
            if (f == Fault.DISK_FULL) {
                throw new IOException("No space left on device");
            }
            if (f == Fault.OUT_OF_MEMORY) {
                throw new OutOfMemoryError("Java heap space");
            }
        }

        private int counted(int n) {
            bytesWritten += n;
            return n;
        }

        @Override
        public int write(ByteBuffer src) throws IOException {
            beforeWrite();
            return counted(d.write(src));
        }

        @Override
        public long write(ByteBuffer[] srcs, int offset, int length) throws IOException {
            beforeWrite();
            long n = d.write(srcs, offset, length);
            bytesWritten += n;
            return n;
        }

        @Override
        public int write(ByteBuffer src, long position) throws IOException {
            beforeWrite();
            return counted(d.write(src, position));
        }

        @Override
        public void force(boolean metaData) throws IOException {
            if (fault == Fault.FORCE_FAILS && where.test(name)) {
                throw new IOException("Input/output error");
            }
            d.force(metaData);
        }

        @Override
        public int read(ByteBuffer dst) throws IOException {
            return d.read(dst);
        }

        @Override
        public long read(ByteBuffer[] dsts, int offset, int length) throws IOException {
            return d.read(dsts, offset, length);
        }

        @Override
        public int read(ByteBuffer dst, long position) throws IOException {
            return d.read(dst, position);
        }

        @Override
        public long position() throws IOException {
            return d.position();
        }

        @Override
        public FileChannel position(long newPosition) throws IOException {
            d.position(newPosition);
            return this;
        }

        @Override
        public long size() throws IOException {
            return d.size();
        }

        @Override
        public FileChannel truncate(long size) throws IOException {
            d.truncate(size);
            return this;
        }

        @Override
        public long transferTo(long position, long count, WritableByteChannel target) throws IOException {
            return d.transferTo(position, count, target);
        }

        @Override
        public long transferFrom(ReadableByteChannel src, long position, long count) throws IOException {
            beforeWrite();
            return d.transferFrom(src, position, count);
        }

        @Override
        public MappedByteBuffer map(MapMode mode, long position, long size) throws IOException {
            return d.map(mode, position, size);
        }

        @Override
        public FileLock lock(long position, long size, boolean shared) throws IOException {
            return d.lock(position, size, shared);
        }

        @Override
        public FileLock tryLock(long position, long size, boolean shared) throws IOException {
            return d.tryLock(position, size, shared);
        }

        @Override
        protected void implCloseChannel() throws IOException {
            d.close();
        }
    }
}
