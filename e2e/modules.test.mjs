// Unit tests of the live view's modules that need no page: formatting, the worst-first order and
// staleness, the track store's merging, and the event-stream parser. Run with `node --test` (Node 20),
// importing the very files the service serves.

import assert from 'node:assert/strict';
import { test } from 'node:test';
import { clockText, durationText, isEpochSeconds, shortClock } from '../src/main/resources/web/js/format.js';
import { EventStreamParser } from '../src/main/resources/web/js/link.js';
import { TrackStore } from '../src/main/resources/web/js/store.js';
import { reasonsOf, severity, staleness, STALE_AFTER_S, worstFirst } from '../src/main/resources/web/js/status.js';

test('a time is read as UTC only when it looks like epoch seconds', () => {
  // 1e9 s is 2001-09-09T01:46:40Z; 1.8e9 s falls at 08:00:00 UTC (1.8e9 mod 86400 = 28800 s), so the
  // demo drives' first sample, 1800003600.5, is 09:00:00.5 UTC (exact hand cases). Drive-relative
  // clocks stay plain seconds.
  assert.equal(isEpochSeconds(1e9), false);
  assert.equal(isEpochSeconds(1e9 + 1), true);
  assert.equal(isEpochSeconds(360.5), false);
  assert.equal(clockText(1800003600.5), '09:00:00.5 UTC');
  assert.equal(clockText(360.5), 't = 360.5 s');
  assert.equal(shortClock(1800003600.5), 'at 09:00:00.5 UTC');
  assert.equal(shortClock(12.34), 'at t = 12.3 s');
});

test('durations read as seconds, then minutes, then hours', () => {
  assert.equal(durationText(0.24), '0.2 s');
  assert.equal(durationText(99.94), '99.9 s');
  assert.equal(durationText(125), '2 min 05 s');
  assert.equal(durationText(3600 + 7 * 60 + 59), '1 h 07 min');
  assert.equal(durationText(NaN), '–');
});

test('the fleet is ordered unreliable, bridging, degraded, stale, then the rest', () => {
  const rows = [
    { id: 'fine', state: 'aided', stale: false },
    { id: 'silent', state: 'aided', stale: true },
    { id: 'starting', state: 'initializing', stale: false },
    { id: 'poor', state: 'degraded', stale: false },
    { id: 'lost', state: 'unreliable', stale: false, radiusM: 12, limitM: 10 },
    { id: 'lost-more', state: 'unreliable', stale: false, radiusM: 30, limitM: 10 },
    { id: 'gap', state: 'bridging', stale: true },
    { id: 'new', state: null, stale: false },
  ];
  assert.deepEqual(rows.sort(worstFirst).map((r) => r.id),
    ['lost-more', 'lost', 'gap', 'poor', 'silent', 'starting', 'new', 'fine']);
  // A stale vehicle in trouble keeps the rank of its trouble.
  assert.equal(severity('bridging', true), severity('bridging', false));
});

test('vehicles that are fine keep their places by id whatever their radius', () => {
  const rows = [
    { id: 'b', state: 'aided', stale: false, radiusM: 9, limitM: 10 },
    { id: 'a', state: 'aided', stale: false, radiusM: 1, limitM: 10 },
  ];
  assert.deepEqual(rows.sort(worstFirst).map((r) => r.id), ['a', 'b']);
});

test("staleness is the service's word when it gives one, else the page's own clock", () => {
  assert.deepEqual(staleness({ stale: true, received_at: 1000 }, 0, 1042),
    { stale: true, ageS: 42, by: 'service', received: true });
  // The service says fresh: an old page observation does not overrule it.
  assert.equal(staleness({ stale: false }, 600, NaN).stale, false);
  assert.equal(staleness({}, STALE_AFTER_S + 0.1, NaN).stale, true);
  assert.equal(staleness({}, STALE_AFTER_S - 0.1, NaN).stale, false);
  // received_at alone (no flag) dates the last sample.
  assert.deepEqual(staleness({ received_at: 100 }, 0, 100 + STALE_AFTER_S + 5),
    { stale: true, ageS: STALE_AFTER_S + 5, by: 'page', received: true });
});

test('reason codes read as words, and an unknown code as itself', () => {
  assert.deepEqual(reasonsOf({ reasons: ['no_fix', 'brand_new_code', '', 7] }), [
    { code: 'no_fix', text: 'no fix', known: true },
    { code: 'brand_new_code', text: 'brand_new_code', known: false },
  ]);
  assert.deepEqual(reasonsOf({}), []);
  assert.deepEqual(reasonsOf({ reasons: null }), []);
});

test('a live pose older than the newest held drops the newer ones (the service re-filtered)', () => {
  const track = new TrackStore(180);
  for (const t of [10, 11, 12, 13]) track.addLive({ t, east: t, north: 0 });
  track.addLive({ t: 11.5, east: 0, north: 0 });
  assert.deepEqual(track.poses.map((p) => p.t), [10, 11, 11.5]);
  assert.equal(track.latest.t, 11.5);
  // The same instant replaces.
  track.addLive({ t: 11.5, east: 1, north: 0 });
  assert.equal(track.poses.length, 3);
  assert.equal(track.latest.east, 1);
});

test('history fills in around live poses, which win at the same instant, and the window trims', () => {
  const track = new TrackStore(5);
  track.addLive({ t: 20, east: 1, north: 1, live: true });
  track.mergeHistory([14, 16, 18, 20].map((t) => ({ t, east: 0, north: 0 })));
  assert.deepEqual(track.poses.map((p) => p.t), [16, 18, 20]);
  assert.equal(track.poses[2].live, true);
  track.mergeFixes(15, [{ t: 16, east: 0, north: 0, outcome: 'accepted' }, { t: 19, east: 0, north: 0, outcome: 'gated' }]);
  track.mergeFixes(18, [{ t: 19, east: 0, north: 0, outcome: 'accepted' }]);
  assert.deepEqual(track.fixes.map((f) => [f.t, f.outcome]), [[16, 'accepted'], [19, 'accepted']]);
  track.setWindow(2);
  assert.deepEqual(track.poses.map((p) => p.t), [18, 20]);
  assert.deepEqual(track.fixes.map((f) => f.t), [19]);
});

test('the event-stream parser joins data lines, skips comments and handles line ends split across chunks', () => {
  const events = [];
  const parser = new EventStreamParser((type, data) => events.push([type, data]));
  // Line ends CRLF, LF and CR (HTML Living Standard, "Event stream interpretation"), cut mid-CRLF.
  parser.push(': keep-alive\r\nevent: pose\r');
  parser.push('\ndata: {"t":1}\r\n\r\nid: 2\nevent: pose\ndata: a\ndata:b\n\n');
  parser.push('data: no type\r\rretry: 2500\n');
  parser.push('\nevent: pose\ndata: unfinished');
  assert.deepEqual(events, [['pose', '{"t":1}'], ['pose', 'a\nb'], ['message', 'no type']]);
  assert.equal(parser.retryMs, 2500);
});
