// SVG building blocks shared by the track plot and the close-up: elements, marker shapes, the track
// drawn in stretches of one kind, the vehicle arrow, the 95 % ellipse and the GNSS fix markers.
// Coordinates are screen units (y down); positions come in as ENU metres through X(east) and Y(north).

import { f1, shortClock } from './format.js';

export const SVG_NS = 'http://www.w3.org/2000/svg';

/** An SVG element with attributes and, optionally, text. */
export function el(name, attrs, text) {
  const e = document.createElementNS(SVG_NS, name);
  for (const k in attrs) e.setAttribute(k, attrs[k]);
  if (text !== undefined) e.textContent = text;
  return e;
}

/** A small inline SVG showing one of the page's state symbols (#shape-NAME in index.html). */
export function symbol(name) {
  const svg = document.createElementNS(SVG_NS, 'svg');
  svg.setAttribute('aria-hidden', 'true');
  const use = document.createElementNS(SVG_NS, 'use');
  use.setAttribute('href', '#shape-' + name);
  svg.append(use);
  return svg;
}

/** The round step (1, 2 or 5 times a power of ten) nearest above or below `raw`, for grids and scales. */
export function niceStep(raw) {
  const p = Math.pow(10, Math.floor(Math.log10(raw)));
  const f = raw / p;
  return (f < 1.5 ? 1 : f < 3.5 ? 2 : f < 7.5 ? 5 : 10) * p;
}

// ---------- marker shapes (path data centred on x, y) ----------

const circle = (x, y, r) => `M${f1(x - r)} ${f1(y)}a${f1(r)} ${f1(r)} 0 1 0 ${f1(2 * r)} 0a${f1(r)} ${f1(r)} 0 1 0 ${f1(-2 * r)} 0Z`;
const diamond = (x, y, h) => `M${f1(x)} ${f1(y - h)}L${f1(x + h)} ${f1(y)}L${f1(x)} ${f1(y + h)}L${f1(x - h)} ${f1(y)}Z`;
const triangle = (x, y, r) => `M${f1(x)} ${f1(y - r * 1.4)}L${f1(x + r * 1.3)} ${f1(y + r)}L${f1(x - r * 1.3)} ${f1(y + r)}Z`;
const cross = (x, y, h) => `M${f1(x - h)} ${f1(y - h)}L${f1(x + h)} ${f1(y + h)}M${f1(x + h)} ${f1(y - h)}L${f1(x - h)} ${f1(y + h)}`;
const square = (x, y, h) => `M${f1(x - h)} ${f1(y - h)}h${f1(2 * h)}v${f1(2 * h)}h${f1(-2 * h)}Z`;
const bar = (x, y, h) => `M${f1(x - h)} ${f1(y)}H${f1(x + h)}`;

// ---------- the track ----------

/** How a stretch of track is drawn (line style and marker shape), per navigation state. */
export const STRETCH = { initializing: 'initializing', aided: 'aided', degraded: 'degraded', bridging: 'dr', unreliable: 'bad' };
/** Stretch kinds in drawing order. */
export const KINDS = ['initializing', 'aided', 'degraded', 'dr', 'bad'];

export const stretchOf = (state) => STRETCH[state] || 'initializing';

/** Track marker per stretch kind, matching the state symbols: circle, diamond, triangle, cross. */
export function trackMarker(kind, x, y, r) {
  switch (kind) {
    case 'aided':
    case 'initializing':
      return circle(x, y, r);
    case 'degraded':
      return diamond(x, y, r * 1.3);
    case 'dr':
      return triangle(x, y, r);
    default:
      return cross(x, y, r);
  }
}

/**
 * Path data of a time-ordered run of poses, one string per stretch kind; each stretch starts where
 * the one before ended, so the line has no gaps where the state changes. `visit(pose, kind, x, y)`,
 * when given, sees every pose with its screen position (for markers and past ellipses).
 */
export function stretchPaths(poses, X, Y, visit) {
  const d = {};
  let prevKind = null;
  let prev = null;
  for (const p of poses) {
    const kind = stretchOf(p.state);
    const x = X(p.east);
    const y = Y(p.north);
    const pt = `${f1(x)} ${f1(y)}`;
    if (kind !== prevKind) {
      d[kind] = (d[kind] || '') + (prev ? `M${prev}L${pt}` : `M${pt}`);
      prevKind = kind;
    } else {
      d[kind] += `L${pt}`;
    }
    prev = pt;
    if (visit) visit(p, kind, x, y);
  }
  return d;
}

/** `seg` path elements of stretchPaths' output, in drawing order. */
export function stretchEls(d) {
  return KINDS.filter((k) => d[k]).map((k) => el('path', { class: `seg seg-${k}`, d: d[k] }));
}

/**
 * The vehicle: an arrow pointing along the heading (degrees clockwise from north; on screen, with y
 * down, an SVG rotation is clockwise too), `size` units from its centre to its tail.
 */
export function vehicleArrow(x, y, headingDeg, size, state) {
  const a = size;
  const heading = Number.isFinite(headingDeg) ? headingDeg : 0;
  const arrow = el('path', {
    class: 'vehicle-mark',
    d: `M0 ${f1(-a * 1.25)}L${f1(a * 0.85)} ${f1(a)}L0 ${f1(a * 0.45)}L${f1(-a * 0.85)} ${f1(a)}Z`,
    transform: `translate(${f1(x)} ${f1(y)}) rotate(${heading.toFixed(1)})`,
  });
  arrow.dataset.state = state;
  return arrow;
}

/** Whether a pose carries a drawable 95 % ellipse (absent or null while the estimate starts). */
export const hasEllipse = (p) => Boolean(p && p.ellipse95 && Number.isFinite(p.ellipse95.semi_major)
  && Number.isFinite(p.ellipse95.semi_minor) && Number.isFinite(p.ellipse95.orientation_deg));

/**
 * The 95 % ellipse of a pose (s: screen units per metre). orientation_deg is the major axis clockwise
 * from north; an unrotated rx lies along east, so rotate by orientation - 90: 0 deg puts the major axis
 * up (north), 90 deg puts it right (east).
 */
export function ellipseEl(p, X, Y, s, cls) {
  const e = p.ellipse95;
  const cx = f1(X(p.east));
  const cy = f1(Y(p.north));
  return el('ellipse', {
    class: cls,
    cx,
    cy,
    rx: Math.max(e.semi_major * s, 0.5).toFixed(2),
    ry: Math.max(e.semi_minor * s, 0.5).toFixed(2),
    transform: `rotate(${(e.orientation_deg - 90).toFixed(2)} ${cx} ${cy})`,
  });
}

// ---------- GNSS fixes ----------

/** Fix outcomes, as the service names them, in drawing order (rarer, more telling ones on top). */
export const OUTCOMES = ['accepted', 'initializing', 'reacquired', 'unusable', 'pending', 'gated'];
/** Outcomes that corrected or started the estimate: many, so thinned on screen. */
export const USED = new Set(['accepted', 'initializing', 'reacquired']);
const OUTCOME_TEXT = {
  accepted: 'accepted fix',
  initializing: 'fix used to start',
  reacquired: 'fix reacquired after a gap',
  pending: 'pending fix (held back after a gap)',
  gated: 'gated fix (rejected by the chi-square gate)',
  unusable: 'fix without a position solution',
};

/** Fix marker per outcome: circle, circle with a dot, diamond, square, boxed X, bar (see the legend). */
function fixMarker(outcome, x, y, r) {
  switch (outcome) {
    case 'accepted':
      return circle(x, y, r);
    case 'reacquired':
      return circle(x, y, r * 1.2) + circle(x, y, 0.4);
    case 'initializing':
      return diamond(x, y, r * 1.3);
    case 'pending':
      return square(x, y, r);
    case 'gated':
      return square(x, y, r * 1.35) + cross(x, y, r * 1.35);
    default:
      return bar(x, y, r * 1.3);
  }
}

/**
 * SVG elements for fixes. Fixes the filter used come five a second and would smear into a band, so
 * they are drawn in one path per outcome, at least `spacing` units apart on screen; every pending,
 * gated or unusable fix is drawn, each as its own element with its time and NIS as a tooltip.
 * Each path carries data-count, the number of fixes of its outcome in the window.
 */
export function fixEls(fixes, X, Y, r, spacing) {
  const d = {};
  const count = {};
  const single = [];
  let last = null;
  for (const f of fixes) {
    const outcome = OUTCOMES.includes(f.outcome) ? f.outcome : 'unusable';
    count[outcome] = (count[outcome] || 0) + 1;
    const x = X(f.east);
    const y = Y(f.north);
    if (USED.has(outcome)) {
      if (last && Math.hypot(x - last[0], y - last[1]) < spacing) continue;
      last = [x, y];
      d[outcome] = (d[outcome] || '') + fixMarker(outcome, x, y, r);
    } else {
      const mark = el('path', { class: `fx fx-${outcome}`, d: fixMarker(outcome, x, y, r), 'data-t': String(f.t), 'data-outcome': outcome });
      const nis = Number.isFinite(f.nis) ? `, NIS ${f.nis.toFixed(1)}` : '';
      mark.append(el('title', {}, `${OUTCOME_TEXT[outcome]}, ${shortClock(f.t)}${nis}`));
      single.push(mark);
    }
  }
  const out = [];
  for (const outcome of OUTCOMES) {
    if (d[outcome]) out.push(el('path', { class: `fx fx-${outcome}`, d: d[outcome], 'data-count': String(count[outcome]), 'data-outcome': outcome }));
  }
  return out.concat(single);
}
