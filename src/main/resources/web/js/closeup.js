// The close-up: the last stretch of track and the 95 % ellipse around the vehicle at a scale where the
// ellipse fills about two thirds of the box, with rings at a round distance for reading its size.
// The box is 200 units wide (viewBox -100..100), centred on the vehicle, north up.

import { f1, metresText } from './format.js';
import { el, ellipseEl, fixEls, hasEllipse, niceStep, stretchEls, stretchPaths, vehicleArrow } from './shapes.js';
import { knownState } from './status.js';

/** Vehicle time of the fixes shown in the close-up (s). */
const CLOSEUP_FIX_S = 10;
/** Half the box in viewBox units. */
const HALF = 100;

/**
 * @param p the latest pose, or null
 * @param track the TrackStore (poses and fixes near the vehicle)
 */
export function renderCloseup(p, track) {
  const svg = document.getElementById('closeup-svg');
  if (!p || !hasEllipse(p) || !Number.isFinite(p.east) || !Number.isFinite(p.north)) {
    svg.replaceChildren();
    return;
  }
  const e = p.ellipse95;
  const halfM = Math.max(e.semi_major * 1.5, 3); // metres from the centre to the box edge
  const s = HALF / halfM;
  const X = (east) => (east - p.east) * s;
  const Y = (north) => -(north - p.north) * s;
  const ring = niceStep(halfM * 0.8);
  const parts = [];
  for (let r = ring; r <= halfM * 1.42; r += ring) parts.push(el('circle', { class: 'ring', r: f1(r * s) }));
  parts.push(el('path', { class: 'ring', d: `M${-HALF} 0H${HALF}M0 ${-HALF}V${HALF}` }));
  // The recent track that fits in the box, drawn with the same stretch styles as the plot.
  const poses = track.poses;
  let start = poses.length;
  while (start > 0) {
    const q = poses[start - 1];
    if (!Number.isFinite(q.east) || Math.abs(q.east - p.east) > halfM * 2 || Math.abs(q.north - p.north) > halfM * 2) break;
    start--;
  }
  parts.push(...stretchEls(stretchPaths(poses.slice(start), X, Y)));
  // Fixes of the last CLOSEUP_FIX_S seconds that fall in the box, all of them (no thinning here).
  const near = track.fixes.filter((f) => f.t > p.t - CLOSEUP_FIX_S && f.t <= p.t
    && Math.abs(f.east - p.east) < halfM * 1.1 && Math.abs(f.north - p.north) < halfM * 1.1);
  parts.push(...fixEls(near, X, Y, 4, 0));
  const state = knownState(p.state);
  const ell = ellipseEl(p, X, Y, s, 'ell-now');
  ell.dataset.state = state;
  parts.push(ell);
  parts.push(vehicleArrow(0, 0, p.heading_deg, 9, state));
  // Labels sit in the left corners, haloed, so that no ring size or label length pushes them out of the box.
  const pad = 4;
  parts.push(el('text', { class: 'ring-text', x: -HALF + pad, y: -HALF + pad, 'dominant-baseline': 'hanging' }, 'N ↑'));
  parts.push(el('text', { class: 'ring-text', x: -HALF + pad, y: HALF - pad }, `rings ${metresText(ring)}`));
  svg.replaceChildren(...parts);
}
