// The track plot: the selected vehicle's track over the window in local east / north metres, drawn in
// stretches by state, the received fixes by the filter's decision, faint 95 % ellipses along stretches
// without fixes, the current ellipse, the vehicle arrow with its label, a grid, a north arrow and a
// scale bar. Screen units are CSS pixels; one metre has the same length along both axes.

import { f1 } from './format.js';
import {
  KINDS, USED, OUTCOMES, el, ellipseEl, fixEls, hasEllipse, niceStep, stretchEls, stretchPaths, trackMarker, vehicleArrow,
} from './shapes.js';
import { knownState } from './status.js';

/** Vehicle time between faint 95 % ellipses along a stretch without fixes (s). */
const PAST_ELLIPSE_EVERY_S = 5;
/** Smallest on-screen spacing of track markers (CSS px, before large type). */
const MARKER_SPACING_PX = 20;
/** Smallest span the plot shows (m), so a parked vehicle is not magnified into noise. */
const MIN_SPAN_M = 30;
/** Smallest on-screen spacing of fixes the filter used (CSS px, before large type); others are all drawn. */
const FIX_SPACING_PX = 10;
/**
 * The track is said to fall short of the chosen window when its first pose is more than this much
 * later than the window's start (s): a few seconds are the spacing of poses, not missing history.
 */
const WINDOW_SHORT_S = 5;

const $ = (id) => document.getElementById(id);
const GROUPS = ['g-grid', 'g-ellipses', 'g-track', 'g-fixes', 'g-fixes-used', 'g-now', 'g-frame'];

/**
 * Says how much track is drawn when that is less than the chosen window. The service keeps
 * history.max_poses poses per vehicle (about 2 minutes at the defaults) and the page keeps only what
 * it has received since it opened, so "last 10 min" may show less; the note says so in words
 * rather than letting the window's name promise more.
 */
function renderWindowNote(track) {
  const note = $('window-note');
  const tr = track.poses;
  let text = '';
  if (track.latest && tr.length > 1 && tr[0].t > track.latest.t - track.windowS + WINDOW_SHORT_S) {
    text = `${f1((track.latest.t - tr[0].t) / 60)} min held`;
  }
  if (note.textContent !== text) note.textContent = text;
}

/** The legend's counts: fixes of each outcome beside the drawn track. */
function renderFixCounts(fixes) {
  const count = {};
  for (const f of fixes) count[f.outcome] = (count[f.outcome] || 0) + 1;
  for (const outcome of OUTCOMES) {
    const n = $('n-' + outcome);
    const text = String(count[outcome] || 0);
    if (n.textContent !== text) n.textContent = text;
  }
}

/**
 * @param track the TrackStore of the selected vehicle
 * @param selected its id
 * @param stale whether it has stopped sending (said in its label)
 */
export function renderPlot(track, selected, stale) {
  renderWindowNote(track);
  const box = $('plot');
  const w = box.clientWidth;
  const h = box.clientHeight;
  const pts = track.poses.filter((p) => Number.isFinite(p.east) && Number.isFinite(p.north));
  const [gGrid, gEll, gTrack, gFixes, gFixesUsed, gNow, gFrame] = GROUPS.map($);
  $('plot-empty').hidden = pts.length > 0;
  if (!pts.length || w < 10 || h < 10) {
    for (const g of [gGrid, gEll, gTrack, gFixes, gFixesUsed, gNow, gFrame]) g.replaceChildren();
    renderFixCounts([]);
    return;
  }
  const scaleUi = parseFloat(getComputedStyle(document.documentElement).getPropertyValue('--scale')) || 1;
  const now = pts[pts.length - 1];
  const reach = hasEllipse(now) ? now.ellipse95.semi_major : 0;

  // Bounds in metres: the track and the current 95 % ellipse, padded, at least MIN_SPAN_M wide.
  let minE = Infinity, maxE = -Infinity, minN = Infinity, maxN = -Infinity;
  for (const p of pts) {
    if (p.east < minE) minE = p.east;
    if (p.east > maxE) maxE = p.east;
    if (p.north < minN) minN = p.north;
    if (p.north > maxN) maxN = p.north;
  }
  minE = Math.min(minE, now.east - reach); maxE = Math.max(maxE, now.east + reach);
  minN = Math.min(minN, now.north - reach); maxN = Math.max(maxN, now.north + reach);
  // Fixes beside the track widen the view too, by at most a quarter of the track's span, so that an
  // outlier kilometres off does not shrink the track to a dot (it is counted in the legend anyway).
  const fixes = track.fixesIn(pts[0].t, now.t);
  const grow = Math.max(maxE - minE, maxN - minN, MIN_SPAN_M) / 4;
  const [e0, e1, n0, n1] = [minE - grow, maxE + grow, minN - grow, maxN + grow];
  for (const f of fixes) {
    if (f.east < e0 || f.east > e1 || f.north < n0 || f.north > n1) continue;
    if (f.east < minE) minE = f.east;
    if (f.east > maxE) maxE = f.east;
    if (f.north < minN) minN = f.north;
    if (f.north > maxN) maxN = f.north;
  }
  const margin = 44 * scaleUi;
  const spanE = Math.max(maxE - minE, MIN_SPAN_M);
  const spanN = Math.max(maxN - minN, MIN_SPAN_M);
  const s = Math.min((w - 2 * margin) / spanE, (h - 2 * margin) / spanN); // px per metre, same on both axes
  const cE = (minE + maxE) / 2;
  const cN = (minN + maxN) / 2;
  const X = (e) => w / 2 + (e - cE) * s;
  const Y = (n) => h / 2 - (n - cN) * s;

  // Grid: labelled lines every `step` metres.
  const step = niceStep(110 * scaleUi / s);
  const grid = [];
  const eFrom = Math.ceil((cE - w / 2 / s) / step) * step;
  const nFrom = Math.ceil((cN - h / 2 / s) / step) * step;
  let dMinor = '';
  for (let e = eFrom - step / 2; e < cE + w / 2 / s; e += step / 2) dMinor += `M${f1(X(e))} 0V${h}`;
  for (let n = nFrom - step / 2; n < cN + h / 2 / s; n += step / 2) dMinor += `M0 ${f1(Y(n))}H${w}`;
  grid.push(el('path', { class: 'grid-minor', d: dMinor }));
  let dMajor = '';
  for (let e = eFrom; e < cE + w / 2 / s; e += step) {
    dMajor += `M${f1(X(e))} 0V${h}`;
    if (X(e) < w - 60 * scaleUi) grid.push(el('text', { class: 'tick', x: f1(X(e) + 3), y: f1(13 * scaleUi) }, `${Math.round(e)} E`));
  }
  for (let n = nFrom; n < cN + h / 2 / s; n += step) {
    dMajor += `M0 ${f1(Y(n))}H${w}`;
    if (Y(n) > 30 * scaleUi && Y(n) < h - 50 * scaleUi) grid.push(el('text', { class: 'tick', x: 4, y: f1(Y(n) - 3) }, `${Math.round(n)} N`));
  }
  grid.unshift(el('path', { class: 'grid-major', d: dMajor }));
  gGrid.replaceChildren(...grid);

  // Track: one path per stretch kind; markers at least `spacing` px apart; faint ellipses every
  // PAST_ELLIPSE_EVERY_S along stretches without fixes. Screen points are kept for placing the label.
  const marks = {};
  const ellipses = [];
  const screen = [];
  let lastMark = null;
  let lastEllT = -Infinity;
  const spacing = MARKER_SPACING_PX * scaleUi;
  const mr = 3.6 * scaleUi;
  const paths = stretchPaths(pts, X, Y, (p, kind, x, y) => {
    screen.push(x, y);
    if (!lastMark || Math.hypot(x - lastMark[0], y - lastMark[1]) >= spacing) {
      marks[kind] = (marks[kind] || '') + trackMarker(kind, x, y, mr);
      lastMark = [x, y];
    }
    const withoutFix = kind === 'dr' || kind === 'bad';
    if (withoutFix && p !== now && hasEllipse(p) && p.t - lastEllT >= PAST_ELLIPSE_EVERY_S) {
      ellipses.push(ellipseEl(p, X, Y, s, 'ell-past'));
      lastEllT = p.t;
    }
    if (!withoutFix) lastEllT = -Infinity;
  });
  const trackEls = stretchEls(paths);
  for (const kind of KINDS) {
    if (marks[kind]) trackEls.push(el('path', { class: `mk-${kind}`, d: marks[kind] }));
  }
  gTrack.replaceChildren(...trackEls);
  gEll.replaceChildren(...ellipses);
  // Fixes the filter used go beneath the track line (they lie on it, and the line's style tells the
  // state); the others above it.
  const fixMarks = fixEls(fixes, X, Y, 3.2 * scaleUi, FIX_SPACING_PX * scaleUi);
  gFixesUsed.replaceChildren(...fixMarks.filter((m) => USED.has(m.dataset.outcome)));
  gFixes.replaceChildren(...fixMarks.filter((m) => !USED.has(m.dataset.outcome)));
  renderFixCounts(fixes);

  // Frame, bottom left: a north arrow and a scale bar on one plate.
  const frame = [];
  const barM = niceStep(w / s / 6);
  const barPx = barM * s;
  const na = 8 * scaleUi;
  const plateH = 34 * scaleUi;
  const plateW = barPx + na * 2 + 34 * scaleUi;
  const px0 = 8;
  const py0 = h - plateH - 8;
  frame.push(el('rect', { class: 'frame-bg', x: px0, y: f1(py0), width: f1(plateW), height: f1(plateH), rx: 4 }));
  const nx = px0 + 8 + na;
  const ny = py0 + plateH * 0.42;
  frame.push(el('path', { class: 'north', d: `M${f1(nx)} ${f1(ny - na)}L${f1(nx + na * 0.7)} ${f1(ny + na)}L${f1(nx)} ${f1(ny + na * 0.5)}L${f1(nx - na * 0.7)} ${f1(ny + na)}Z` }));
  frame.push(el('text', { class: 'north-text', x: f1(nx), y: f1(py0 + plateH - 3), 'text-anchor': 'middle' }, 'N'));
  const bx = nx + na + 12 * scaleUi;
  const by = py0 + plateH - 8 * scaleUi;
  frame.push(el('path', { class: 'scalebar', d: `M${f1(bx)} ${f1(by - 6)}V${f1(by)}H${f1(bx + barPx)}V${f1(by - 6)}` }));
  frame.push(el('text', { class: 'scalebar-text', x: f1(bx + 3), y: f1(by - 8) }, `${barM >= 1 ? barM : barM.toFixed(1)} m`));
  gFrame.replaceChildren(...frame);

  // Now: the 95 % ellipse, the heading arrow and a label with the state in words.
  const st = knownState(now.state);
  const nowEls = [];
  if (hasEllipse(now)) {
    const e = ellipseEl(now, X, Y, s, 'ell-now');
    e.dataset.state = st;
    nowEls.push(e);
  }
  const x = X(now.east);
  const y = Y(now.north);
  const a = 11 * scaleUi;
  const arrow = vehicleArrow(x, y, now.heading_deg, a, st);
  if (stale) arrow.dataset.stale = 'true';
  nowEls.push(arrow);
  gNow.replaceChildren(...nowEls);
  const plate = { left: px0, top: py0, right: px0 + plateW, bottom: py0 + plateH };
  gNow.append(vehicleLabel(selected, stale ? `${st} · stale` : st,
    { x, y, a, w, h, screen, plate, stroke: 3 * scaleUi, tickBand: 16 * scaleUi }));
}

// ---------- the vehicle's label ----------

/** A name shortened to `keep` characters around an ellipsis in its middle. */
const shorten = (id, keep) => (keep >= id.length ? id : id.slice(0, Math.ceil(keep / 2)) + '…' + id.slice(id.length - Math.floor(keep / 2)));

/**
 * The label beside the vehicle, placed where it covers none of the track: candidate boxes at eight
 * directions around the arrow, at three distances, are scored by the track segments they cross (the
 * label's halo would hide them), by the arrow and the scale plate they cover, and by leaving the plot;
 * the first best one wins, so a free spot near the arrow is preferred and the label does not wander
 * while there is room. A name too long for the plot is shortened in the middle; when no spot is free
 * for the name, the state alone is tried. The full name is in the tooltip and the panel's title.
 */
function vehicleLabel(id, stateText, g) {
  const label = el('text', { class: 'vehicle-label', x: 0, y: 0 });
  label.append(el('title', {}, `${id} · ${stateText}`));
  const text = document.createTextNode('');
  label.append(text);
  $('g-now').append(label);
  const measure = (value) => {
    text.nodeValue = value;
    return label.getBBox();
  };
  const maxW = g.w - 16;
  let named = `${id} · ${stateText}`;
  if (measure(named).width > maxW) {
    // The most characters of the name that fit, by bisection (each try is one text measurement).
    let lo = 0;
    let hi = id.length;
    while (lo < hi) {
      const mid = Math.ceil((lo + hi) / 2);
      if (measure(`${shorten(id, mid)} · ${stateText}`).width <= maxW) lo = mid;
      else hi = mid - 1;
    }
    named = lo >= 4 ? `${shorten(id, lo)} · ${stateText}` : stateText;
  }
  let chosen = null;
  for (const value of named === stateText ? [stateText] : [named, stateText]) {
    const box = measure(value);
    const spot = bestSpot(box.width, box.height, g);
    if (!chosen || spot.score < chosen.spot.score) chosen = { value, box, spot };
    if (spot.score < FREE_SCORE) break;
  }
  label.remove();
  text.nodeValue = chosen.value;
  label.setAttribute('x', f1(chosen.spot.left - chosen.box.x));
  label.setAttribute('y', f1(chosen.spot.top - chosen.box.y));
  return label;
}

/** Scores below this cover nothing (only the preference for spots near the arrow adds up to it). */
const FREE_SCORE = 10;

function bestSpot(lw, lh, g) {
  const { x, y, a } = g;
  // Directions (unit offsets of the box's near corner or edge), the side with more room first.
  const right = x < g.w * 0.62;
  const east = [[0.7, -0.7], [1, 0], [0.7, 0.7]];
  const west = [[-0.7, -0.7], [-1, 0], [-0.7, 0.7]];
  const dirs = [...(right ? east : west), ...(right ? west : east), [0, -1], [0, 1]];
  let best = null;
  [1.5, 3, 5].forEach((k, ring) => {
    const r = a * k;
    for (const [dx, dy] of dirs) {
      const cx = x + dx * r;
      const cy = y + dy * r;
      // Above and below, a wide label slides sideways to stay in the plot rather than be centred.
      const left = dx > 0.1 ? cx : dx < -0.1 ? cx - lw : Math.min(Math.max(cx - lw / 2, 4), g.w - 4 - lw);
      const top = dy > 0.1 ? cy : dy < -0.1 ? cy - lh : cy - lh / 2;
      const rect = { left, top, right: left + lw, bottom: top + lh };
      const score = spotScore(rect, g) + ring * 0.5;
      if (!best || score < best.score) best = { ...rect, score };
    }
  });
  return best;
}

function spotScore(rect, g) {
  let score = 0;
  if (rect.left < 2 || rect.top < 2 || rect.right > g.w - 2 || rect.bottom > g.h - 2) score += 1e6;
  if (overlaps(rect, g.plate)) score += 200;
  // Grid labels run along the top and the left edge: better not hidden, but no reason to go far.
  if (rect.top < g.tickBand || rect.left < g.tickBand * 3) score += 3;
  const arrowR = g.a * 1.3;
  if (overlaps(rect, { left: g.x - arrowR, top: g.y - arrowR, right: g.x + arrowR, bottom: g.y + arrowR })) score += 100;
  // The line is drawn `stroke` px wide: a segment that passes that close is covered.
  const pad = g.stroke;
  const r = { left: rect.left - pad, top: rect.top - pad, right: rect.right + pad, bottom: rect.bottom + pad };
  const pts = g.screen;
  for (let i = 2; i < pts.length; i += 2) {
    if (segmentMeetsRect(pts[i - 2], pts[i - 1], pts[i], pts[i + 1], r)) score += 10;
  }
  return score;
}

const overlaps = (p, q) => p.left < q.right && q.left < p.right && p.top < q.bottom && q.top < p.bottom;

/** Whether the segment from (x0, y0) to (x1, y1) meets the rectangle (Liang-Barsky clipping). */
function segmentMeetsRect(x0, y0, x1, y1, r) {
  const dx = x1 - x0;
  const dy = y1 - y0;
  let t0 = 0;
  let t1 = 1;
  const edges = [[-dx, x0 - r.left], [dx, r.right - x0], [-dy, y0 - r.top], [dy, r.bottom - y0]];
  for (const [p, q] of edges) {
    if (p === 0) {
      if (q < 0) return false;
    } else {
      const t = q / p;
      if (p < 0) {
        if (t > t1) return false;
        if (t > t0) t0 = t;
      } else {
        if (t < t0) return false;
        if (t < t1) t1 = t;
      }
    }
  }
  return true;
}
