/**
 * The journal of accepted samples: what a logging rig was told was accepted survives a crash.
 *
 * <p>Records are appended to segment files as {@code [length u32][CRC32C u32][payload]}; a torn or
 * corrupt tail is detected by its length or checksum and cut on recovery, never misread. Appends are
 * group-committed: one writer thread writes every queued batch and then forces the file once, and each
 * caller waits for the force that covers its batch. Snapshots of all sessions bound what a restart must
 * replay; segments wholly older than the last snapshot are deleted once they pass the retention limits.
 *
 * <p>Times in file contents are the samples' own (seconds on the vehicle's clock); retention ages are
 * wall-clock seconds of the files, since a journal's age is about disk space, not about vehicles.
 */
package org.wayhold.journal;
