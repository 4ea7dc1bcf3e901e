/**
 * The journal of accepted samples: what a logging rig was told was accepted survives a crash, and what
 * it was told was refused is neither applied nor brought back.
 *
 * <p>Records are appended to segment files as {@code [length u32][CRC32C u32][payload]}, the payload
 * starting with the record's sequence number; a torn last record is detected by its length or checksum
 * and cut on recovery, damage anywhere else is read around and reported by sequence number, and a
 * missing segment shows as a gap in the numbers. Appends are group-committed: one writer thread writes
 * every queued batch and then forces the file once, and each caller waits for the force that covers its
 * batch before the batch is applied. Snapshots of all sessions, streamed to disk one session at a
 * time, bound what a restart must replay; segments wholly older than the older kept snapshot are
 * deleted once they pass the retention limits. One service per directory, held by a file lock.
 *
 * <p>Times in file contents are the samples' own (seconds on the vehicle's clock); retention ages are
 * wall-clock seconds of the files, since a journal's age is about disk space, not about vehicles.
 */
package org.wayhold.journal;
