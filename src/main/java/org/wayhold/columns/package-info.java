/**
 * Bounded stores of records held as columns of primitives rather than as objects, for the per-vehicle
 * histories whose size dominates a session's memory. No units of their own: each owner states what its
 * columns hold.
 */
package org.wayhold.columns;
