// wayhold live view: the fleet table, the selected vehicle's recent track in local ENU metres, and its
// current values. Data comes only from this service: the pose stream while it is open, polling of the
// latest pose with its ETag when it is not, and the received GNSS fixes with the filter's decision on
// each, polled on their own. Units follow the pose JSON: metres, seconds, degrees clockwise from north
// for heading and ellipse orientation, rad/s for the gyro bias.
//
// This module wires the parts together: which vehicle is selected, when what is redrawn, the controls.

import { forgetToken, hasToken, setTokenAsker } from './api.js';
import { LiveLink, POLL_PERIOD_MS } from './link.js';
import { renderAge, renderNow } from './now.js';
import { renderPlot } from './plot.js';
import { TrackStore } from './store.js';
import { askForToken } from './token.js';
import { VehicleList } from './vehicles.js';

/** How often the vehicle list is refreshed (ms). */
const LIST_PERIOD_MS = 2000;
/** Shortest time between two redraws of the plot (ms). */
const PLOT_PERIOD_MS = 150;
/** Track windows the page offers (s). */
const WINDOWS_S = [60, 180, 600];

const $ = (id) => document.getElementById(id);

const track = new TrackStore(180);
const list = new VehicleList({ onSelect: (id) => select(id, true), onListed: pickDefault });
let link = null;
let selected = null;
/** Whether a person (or the address) chose the selected vehicle; if not, the page follows the worst. */
let chosen = false;

// ---------- selection ----------

/** The vehicle named in the address (#vehicle=ID), if the service has it. */
function wantedVehicle() {
  const wanted = new URLSearchParams(location.hash.slice(1)).get('vehicle');
  return wanted && list.has(wanted) ? wanted : null;
}

/**
 * Unless a person chose a vehicle that is still there, shows the vehicle named in the address, or else
 * the one most in need of attention, the top of the worst-first table. While following, the page moves
 * to another vehicle only when that one is in a worse rank (unreliable, bridging, degraded, stale), not
 * when two vehicles of one rank trade places, so that the view does not flicker between them.
 */
function pickDefault() {
  if (chosen && selected && list.has(selected)) return;
  const wanted = wantedVehicle();
  if (wanted) {
    select(wanted, true);
    return;
  }
  const worst = list.worst();
  if (worst === undefined) {
    if (selected) select(null, false);
  } else if (!selected || !list.has(selected) || list.rank(worst) < list.rank(selected)) {
    select(worst, false);
  }
}

/** Selects a vehicle; `byPerson` when a person (or the address) asked for it. */
function select(id, byPerson) {
  chosen = Boolean(id && byPerson);
  $('now-follow').hidden = !id || chosen;
  // Only a vehicle a person chose goes in the address: a reload follows the worst again otherwise.
  history.replaceState(null, '', chosen ? '#vehicle=' + encodeURIComponent(id) : location.pathname + location.search);
  if (id === selected) return;
  if (link) link.close();
  link = null;
  selected = id;
  list.select(id);
  track.clear();
  $('now-vehicle').textContent = id ? `· ${id}` : '';
  if (id) {
    link = new LiveLink(id, track, {
      hintT: () => list.latestT(id),
      hasPose: () => list.hasPose(id),
      onPoses: () => {
        list.notePose(id, track.latest);
        scheduleRender();
      },
      onFixes: schedulePlot,
      onMode: updateLink,
      onService: (ok) => {
        serviceOk = ok;
        updateLink();
      },
    });
    link.start();
  }
  updateLink();
  scheduleRender();
}

// ---------- link status ----------

let serviceOk = true;
let waitingForToken = false;

function setLink(mode, text) {
  const el = $('link');
  el.dataset.mode = mode;
  el.textContent = text;
}

function updateLink() {
  if (waitingForToken) setLink('offline', 'read token needed');
  else if (!serviceOk) setLink('offline', 'service not reachable');
  else if (!selected || !link) setLink('connecting', 'connected, no vehicle selected');
  else if (link.mode === 'stream') setLink('stream', 'live: pose stream');
  else if (link.mode === 'polling') setLink('polling', `live: polling every ${POLL_PERIOD_MS / 1000} s`);
  else setLink('connecting', 'opening the pose stream…');
}

// ---------- rendering ----------

let renderQueued = false;
let plotTimer = 0;
let plotAtMs = -Infinity;

/**
 * Values redraw on the next frame; the plot, which rebuilds every path, at most every PLOT_PERIOD_MS.
 * A replay at many times real time sends hundreds of poses a second, and a wall display or a busy
 * laptop must not spend its whole CPU redrawing a track that moves a pixel per frame.
 */
function scheduleRender() {
  if (renderQueued) return;
  renderQueued = true;
  requestAnimationFrame(() => {
    renderQueued = false;
    renderValues();
    list.renderSelected();
    schedulePlot();
  });
}

function schedulePlot() {
  if (plotTimer) return;
  const wait = Math.max(0, plotAtMs + PLOT_PERIOD_MS - performance.now());
  plotTimer = setTimeout(() => {
    plotTimer = 0;
    plotAtMs = performance.now();
    const status = selected ? list.status(selected) : null;
    renderPlot(track, selected, Boolean(status && status.stale.stale));
  }, wait);
}

function renderValues() {
  const status = selected ? list.status(selected) : null;
  renderNow(track.latest, status, selected, track);
  renderAge(track.latest, track.latestAtMs, status && status.stale);
}

// ---------- controls ----------

function setLarge(on) {
  document.documentElement.classList.toggle('large', on);
  $('large-toggle').setAttribute('aria-pressed', String(on));
  try {
    localStorage.setItem('wayhold.large', on ? '1' : '0');
  } catch (e) {
    // Storage may be off (private windows); the toggle still works for this page.
  }
  scheduleRender();
}

function renderTokenButton() {
  $('forget-token').hidden = !hasToken();
}

async function refreshList() {
  await list.refresh();
  serviceOk = list.serviceOk;
  updateLink();
  renderTokenButton();
  // Staleness and the order of the table move with the wall clock, not only with new poses.
  scheduleRender();
}

function start() {
  setTokenAsker(async (reason) => {
    waitingForToken = true;
    updateLink();
    const token = await askForToken(reason);
    waitingForToken = false;
    updateLink();
    renderTokenButton();
    return token;
  });
  $('forget-token').addEventListener('click', () => {
    forgetToken();
    renderTokenButton();
    // The open stream was let in with the token: start the selected vehicle's link again without it.
    const id = selected;
    const byPerson = chosen;
    select(null, false);
    refreshList();
    if (id) select(id, byPerson);
  });
  const params = new URLSearchParams(location.search);
  let large = params.get('large') === '1';
  try {
    if (!params.has('large')) large = localStorage.getItem('wayhold.large') === '1';
  } catch (e) {
    // As above.
  }
  setLarge(large);
  $('large-toggle').addEventListener('click', () => setLarge(!document.documentElement.classList.contains('large')));
  const sel = $('window-select');
  const w = Number(params.get('window'));
  if (WINDOWS_S.includes(w)) sel.value = String(w);
  track.setWindow(Number(sel.value));
  sel.addEventListener('change', () => {
    const grow = Number(sel.value) > track.windowS;
    track.setWindow(Number(sel.value));
    if (grow && link) link.widen();
    scheduleRender();
  });
  window.addEventListener('hashchange', () => {
    const wanted = wantedVehicle();
    if (wanted) select(wanted, true);
  });
  new ResizeObserver(scheduleRender).observe($('plot'));
  renderTokenButton();
  refreshList();
  setInterval(refreshList, LIST_PERIOD_MS);
  setInterval(renderValues, 1000);
}

start();
