// What a pose says about a vehicle, in words: its navigation state, the reasons the service gives for
// caution, whether the vehicle has stopped sending (stale), and how the fleet table ranks vehicles;
// and the small tags that show these beside a vehicle.

import { durationText } from './format.js';
import { symbol } from './shapes.js';

export const STATES = ['initializing', 'aided', 'degraded', 'bridging', 'unreliable'];

export const STATE_HELP = {
  initializing: 'Waiting for the first fix and a heading.',
  aided: 'GNSS fixes are in use.',
  degraded: 'Fixes arrive but are rejected or poor; leaning on dead reckoning.',
  bridging: 'No usable fix: dead reckoning, 95 % radius within the alert limit.',
  unreliable: 'No usable fix and the 95 % radius is past the alert limit.',
  unknown: 'No pose yet.',
};

/** A state the page knows how to draw, else 'unknown' (a newer service may name more). */
export const knownState = (s) => (STATES.includes(s) ? s : 'unknown');

/**
 * Words for the reason codes the service sends. The vocabulary is open: a code not listed here is
 * shown as it is, so that a newer service is never silenced by an older page.
 */
const REASON_TEXT = {
  no_fix: 'no fix',
  fixes_rejected: 'fixes rejected',
  fixes_inconsistent: 'fixes disagree with odometry',
  odometry_missing: 'odometry missing',
  creeping: 'creeping below wheel-speed threshold',
  calibrating: 'calibration not settled',
  antenna_offset_suspected: 'antenna offset suspected',
  latency_suspected: 'GNSS latency suspected',
};

/** The reasons of a pose or list item as [{ code, text, known }], in the service's order. */
export function reasonsOf(item) {
  const codes = item && Array.isArray(item.reasons) ? item.reasons : [];
  const out = [];
  for (const code of codes) {
    if (typeof code !== 'string' || code === '') continue;
    const text = REASON_TEXT[code];
    out.push({ code, text: text ?? code, known: text !== undefined });
  }
  return out;
}

/** The 95 % radius (m) of a pose or list item; older services only give the ellipse's semi-major axis. */
export function radiusOf(item) {
  if (!item) return NaN;
  if (Number.isFinite(item.radius95)) return item.radius95;
  const e = item.ellipse95;
  return e && Number.isFinite(e.semi_major) ? e.semi_major : NaN;
}

/**
 * Without word from the service, a vehicle whose pose has not moved on for this long on the wall
 * clock, as seen by this page, is shown as stale (s). A service that sends `stale` decides by its own
 * configured time instead.
 */
export const STALE_AFTER_S = 10;

/**
 * Whether a vehicle has stopped sending, and for how long nothing has arrived (s).
 *
 * @param item the latest pose or list item of the vehicle
 * @param seenAgeS wall-clock seconds since this page saw the vehicle's pose time change
 * @param serverNowS the service's clock now (UTC epoch seconds), to read `received_at` against
 * @returns {{ stale: boolean, ageS: number, by: 'service' | 'page', received: boolean }} where `by` says
 *   who judged staleness and `received` whether the age comes from the service's `received_at`
 */
export function staleness(item, seenAgeS, serverNowS) {
  const receivedAtS = item && Number.isFinite(item.received_at) ? item.received_at : NaN;
  const ageFromService = Number.isFinite(receivedAtS) && Number.isFinite(serverNowS)
    ? Math.max(0, serverNowS - receivedAtS) : NaN;
  const received = Number.isFinite(ageFromService);
  const ageS = received ? ageFromService : seenAgeS;
  if (item && typeof item.stale === 'boolean') return { stale: item.stale, ageS, by: 'service', received };
  return { stale: Number.isFinite(ageS) && ageS > STALE_AFTER_S, ageS, by: 'page', received };
}

/**
 * Rank in the fleet table, worst first: unreliable, bridging, degraded (stale or not), then vehicles
 * that stopped sending in any other state, then the rest (still starting, no pose yet, aided).
 */
export function severity(state, stale) {
  switch (state) {
    case 'unreliable': return 0;
    case 'bridging': return 1;
    case 'degraded': return 2;
    default:
      if (stale) return 3;
      return state === 'initializing' ? 4 : state === 'aided' ? 6 : 5;
  }
}

/**
 * Orders table entries { id, state, stale, radiusM, limitM }: by severity; among vehicles in trouble
 * (unreliable, bridging, degraded), the larger share of the alert limit first; then by id, so that
 * vehicles that are fine keep their places from one refresh to the next.
 */
export function worstFirst(a, b) {
  const rank = severity(a.state, a.stale);
  const d = rank - severity(b.state, b.stale);
  if (d !== 0) return d;
  if (rank <= 2) {
    const share = (e) => (Number.isFinite(e.radiusM)
      ? (Number.isFinite(e.limitM) && e.limitM > 0 ? e.radiusM / e.limitM : e.radiusM) : -1);
    const s = share(b) - share(a);
    if (s !== 0) return s;
  }
  return a.id < b.id ? -1 : a.id > b.id ? 1 : 0;
}

// ---------- tags ----------

/** The state as a chip: its symbol and its name; a stale vehicle's chip is drawn muted, not in its colour. */
export function stateChip(state, stale) {
  const span = document.createElement('span');
  span.className = 'chip';
  span.dataset.state = state;
  if (stale) span.dataset.stale = 'true';
  const text = document.createElement('span');
  text.className = 'chip-text';
  text.textContent = state === 'unknown' ? 'no pose' : state;
  span.append(symbol(state), text);
  return span;
}

/** "stale 42 s": the vehicle stopped sending; the age is how long nothing has arrived. */
export function staleTag(stale) {
  const span = document.createElement('span');
  span.className = 'stale-tag';
  const text = document.createElement('span');
  text.textContent = Number.isFinite(stale.ageS) ? `stale ${durationText(stale.ageS)}` : 'stale';
  span.title = stale.by === 'service'
    ? 'The service has received nothing from this vehicle for longer than its stale time; the state is the last one the filter gave.'
    : 'This page has seen no new pose from this vehicle for a while; the state is the last one the filter gave.';
  span.append(symbol('stale'), text);
  return span;
}

/** One reason code in words (the raw code when the page does not know it). */
export function reasonTag(reason) {
  const span = document.createElement('span');
  span.className = 'reason';
  span.dataset.code = reason.code;
  span.textContent = reason.text;
  span.title = reason.known ? `reason: ${reason.code}` : 'reason code from the service';
  return span;
}
