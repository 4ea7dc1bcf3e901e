package org.wayhold.journal;

import java.io.IOException;
import java.io.PrintStream;
import java.io.RandomAccessFile;
import java.nio.ByteBuffer;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.stream.Stream;
import org.wayhold.sample.Sample;
import org.wayhold.session.SessionStats;
import org.wayhold.session.VehicleSession;
import org.wayhold.settings.JournalSettings;
import org.wayhold.settings.Settings;
import org.wayhold.testing.JournalFixtures;
import org.wayhold.testing.SessionSurgery;

/**
 * Figures of what journal damage costs, by kind and place (not a test: run by hand, prints a table).
 *
 * <p>Builds a journal as the service does (write-ahead: each batch recorded, then applied with its
 * sequence number) for four vehicles over two simulated minutes each, one batch per second, in 16 KiB
 * segments, with a snapshot after the first minute and none at the end (as after a crash). Then, on a
 * copy each time, damages one segment wholly before the snapshot's floor ("covered") or one after it
 * and before the last ("uncovered") by a flipped byte, a truncation in the middle, or deleting it, and
 * recovers with {@link SessionJournal}. Prints the samples acknowledged and restored, how many vehicles
 * end on their uninterrupted pose, and what recovery reported.
 *
 * <p>Usage: {@code JournalDamageStudyMain [WORK_DIR]} (default: a new temporary directory).
 */
public final class JournalDamageStudyMain {

    private static final Settings SETTINGS = Settings.defaults();
    private static final JournalSettings SMALL = new JournalSettings(true, 0.0, 16 * 1024, 3600.0, 1L << 30, 3600.0);
    private static final int VEHICLES = 4;
    private static final int SECONDS = 120;

    private JournalDamageStudyMain() {
    }

    public static void main(String[] args) throws IOException {
        Path work = args.length > 0 ? Path.of(args[0]) : Files.createTempDirectory("wayhold-damage");
        PrintStream out = System.out;
        Path pristine = work.resolve("pristine");
        Map<String, List<List<Sample>>> drives = new LinkedHashMap<>();
        for (int v = 0; v < VEHICLES; v++) {
            drives.put("van-" + v, SessionSurgery.batches(500L + v, SECONDS / 60.0));
        }
        long floor = build(pristine, drives);
        long acknowledged = 0;
        Map<String, VehicleSession> reference = new LinkedHashMap<>();
        for (Map.Entry<String, List<List<Sample>>> e : drives.entrySet()) {
            VehicleSession s = SessionSurgery.fed(e.getKey(), SETTINGS, e.getValue(), e.getValue().size());
            reference.put(e.getKey(), s);
            acknowledged += applied(s);
        }
        List<Path> segments = segments(pristine);
        int covered = -1;
        int uncovered = -1;
        for (int i = 0; i + 1 < segments.size(); i++) {
            long next = Journal.seqOf(segments.get(i + 1), Journal.SEGMENT_PREFIX, Journal.SEGMENT_SUFFIX);
            long first = Journal.seqOf(segments.get(i), Journal.SEGMENT_PREFIX, Journal.SEGMENT_SUFFIX);
            if (next <= floor && covered < 0 && i > 0) {
                covered = i;
            }
            if (first > floor && uncovered < 0 && i + 2 < segments.size()) {
                uncovered = i;
            }
        }
        out.printf(Locale.ROOT, "journal: %d vehicles x %d s, %d records in %d segments of <= %d bytes, snapshot floor"
                + " at record %d; %d samples acknowledged%n", VEHICLES, SECONDS, countRecords(segments), segments.size(),
                SMALL.segmentBytes(), floor, acknowledged);
        out.printf(Locale.ROOT, "covered segment: %s, uncovered segment: %s%n%n", segments.get(covered).getFileName(),
                segments.get(uncovered).getFileName());
        out.println("| damage | segment | samples acknowledged | samples restored | vehicles on their uninterrupted pose"
                + " | lost (sequence numbers) | bytes cut / read around | /health |");
        out.println("|---|---|---|---|---|---|---|---|");
        for (String kind : List.of("flipped byte", "truncation", "deleted segment")) {
            for (String place : List.of("covered", "uncovered")) {
                Path copy = work.resolve(kind.replace(' ', '-') + "-" + place);
                copyDir(pristine, copy);
                Path victim = segments(copy).get(place.equals("covered") ? covered : uncovered);
                damage(kind, victim);
                try (SessionJournal j = SessionJournal.open(copy, SETTINGS, null)) {
                    long restored = 0;
                    int same = 0;
                    for (VehicleSession s : j.sessions().sessions()) {
                        restored += applied(s);
                        if (s.latest().equals(reference.get(s.vehicleId()).latest())) {
                            same++;
                        }
                    }
                    Journal.RecoveryReport r = j.recovery();
                    StringBuilder lost = new StringBuilder();
                    for (Journal.Loss l : r.lost()) {
                        lost.append(lost.length() == 0 ? "" : "; ").append(l.toKnown()
                                ? l.fromSeq() + "-" + l.toSeq() + " (" + l.count() + ")" : l.fromSeq() + "- (open)");
                    }
                    out.printf(Locale.ROOT, "| %s | %s | %d | %d | %d of %d | %s | %d / %d | %s |%n", kind, place,
                            acknowledged, restored, same, VEHICLES, lost.length() == 0 ? "none" : lost, r.bytesCut(),
                            r.damagedBytes(), r.lost().isEmpty() ? "ok" : "degraded, journal_records_lost");
                    for (String note : r.notes()) {
                        out.println("  note: " + note);
                    }
                }
            }
        }
    }

    /** The journal as the service writes it; returns the snapshot's floor. */
    private static long build(Path dir, Map<String, List<List<Sample>>> drives) throws IOException {
        Map<String, VehicleSession> live = new LinkedHashMap<>();
        long floor = -1;
        try (Journal j = Journal.open(dir, SMALL)) {
            j.recover(JournalFixtures.KEEP_NOTHING);
            for (int second = 0; second < SECONDS; second++) {
                for (Map.Entry<String, List<List<Sample>>> e : drives.entrySet()) {
                    if (second >= e.getValue().size()) {
                        continue;
                    }
                    List<Sample> batch = e.getValue().get(second);
                    long seq = Journal.await(j.append(e.getKey(), batch));
                    live.computeIfAbsent(e.getKey(), id -> new VehicleSession(id, SETTINGS, null)).replay(batch, seq);
                }
                if (second == SECONDS / 2) {
                    floor = j.nextSeq();
                    j.writeSnapshot(floor, j.firstPendingSeq(), new ArrayList<>(live.keySet()), (id, out) -> {
                        VehicleSession.Captured c = live.get(id).writeSnapshot(out);
                        return new Journal.SnapshotEntry(c.lastSeq(), c.quarantineReason());
                    });
                }
            }
        }
        return floor;
    }

    private static void damage(String kind, Path segment) throws IOException {
        switch (kind) {
            case "flipped byte" -> {
                // The middle of the third record's payload.
                ByteBuffer b = ByteBuffer.wrap(Files.readAllBytes(segment));
                long at = 0;
                for (int i = 0; i < 2; i++) {
                    at += 8 + b.getInt((int) at);
                }
                at += 8 + b.getInt((int) at) / 2;
                try (RandomAccessFile f = new RandomAccessFile(segment.toFile(), "rw")) {
                    f.seek(at);
                    int v = f.read();
                    f.seek(at);
                    f.write(v ^ 0x5a);
                }
            }
            case "truncation" -> {
                try (RandomAccessFile f = new RandomAccessFile(segment.toFile(), "rw")) {
                    f.setLength(f.length() / 2);
                }
            }
            default -> Files.delete(segment);
        }
    }

    private static long applied(VehicleSession s) {
        SessionStats st = s.stats();
        return st.wheelSpeedApplied() + st.yawRateApplied() + st.gnssApplied() + st.referenceApplied();
    }

    private static List<Path> segments(Path dir) throws IOException {
        try (Stream<Path> s = Files.list(dir)) {
            return s.filter(p -> p.getFileName().toString().matches("segment-\\d+\\.wal"))
                    .filter(p -> p.toFile().length() > 0).sorted().toList();
        }
    }

    private static long countRecords(List<Path> segments) throws IOException {
        long n = 0;
        for (Path p : segments) {
            ByteBuffer b = ByteBuffer.wrap(Files.readAllBytes(p));
            while (b.remaining() >= 8) {
                b.position(b.position() + 8 + b.getInt(b.position()));
                n++;
            }
        }
        return n;
    }

    private static void copyDir(Path from, Path to) throws IOException {
        Files.createDirectories(to);
        try (Stream<Path> s = Files.list(from)) {
            for (Path p : s.toList()) {
                if (!p.getFileName().toString().equals(DataDirectoryLock.FILE_NAME)) {
                    Files.copy(p, to.resolve(p.getFileName()));
                }
            }
        }
    }
}
